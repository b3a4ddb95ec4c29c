/** `efflux token create --role ROLE --name NAME [--label LABEL]`: prints a new API token on stdout. */
import { openStore, ROLES, SYSTEM_ACTOR, type Role } from '../store/index.js';
import { dataDir } from './serve-config.js';

function option(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(`--${name}`);
  if (i >= 0) return argv[i + 1];
  const eq = argv.find((a) => a.startsWith(`--${name}=`));
  return eq?.slice(name.length + 3);
}

export async function run(argv: string[]): Promise<number> {
  const [sub, ...rest] = argv;
  const role = option(rest, 'role');
  const name = option(rest, 'name');
  if (sub !== 'create' || !role || !name) {
    process.stderr.write(`usage: efflux token create --role ${ROLES.join('|')} --name NAME [--label LABEL]\n`);
    return 2;
  }
  if (!(ROLES as readonly string[]).includes(role)) {
    process.stderr.write(`efflux token: role must be one of ${ROLES.join(', ')}, not "${role}"\n`);
    return 2;
  }
  const store = openStore({ dataDir: dataDir() });
  try {
    const { token, user } = store.users.createToken(SYSTEM_ACTOR, name, role as Role, option(rest, 'label') ?? 'cli');
    process.stdout.write(`${token}\n`);
    process.stderr.write(`token for ${user.name} (${user.role}); it is shown only now\n`);
    return 0;
  } catch (e) {
    process.stderr.write(`efflux token: ${(e as Error).message}\n`);
    return 2;
  } finally {
    store.close();
  }
}
