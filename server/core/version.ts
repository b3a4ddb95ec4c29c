/** Version of the computation; stored with every fit so a refit can say what produced it. Kept equal to package.json's version (a test checks). */
export const ENGINE_VERSION = '0.2.0';
