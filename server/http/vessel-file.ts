// The service's vessel-file check lives in core (the web's vessel form bundles it): re-exported here.
export { checkVesselFile } from '../core/vessel/service-file.js';
