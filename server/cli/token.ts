/**
 * `efflux token create --role ROLE --name NAME [--label LABEL]` prints a new API token on stdout
 * (creating the person when new); `token list [--name NAME]`; `token revoke ID` (sessions opened
 * with it end at once).
 */
import {
  ConflictError,
  NotFoundError,
  openStore,
  ROLES,
  SYSTEM_ACTOR,
  type Role,
} from '../store/index.js';
import { dataDir } from './serve-config.js';

function option(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(`--${name}`);
  if (i >= 0) return argv[i + 1];
  const eq = argv.find((a) => a.startsWith(`--${name}=`));
  return eq?.slice(name.length + 3);
}

const USAGE = `usage: efflux token create --role ${ROLES.join('|')} --name NAME [--label LABEL]
       efflux token list [--name NAME]
       efflux token revoke TOKEN_ID\n`;

export async function run(argv: string[]): Promise<number> {
  const [sub, ...rest] = argv;
  if (sub === 'list' || sub === 'revoke') return manage(sub, rest);
  const role = option(rest, 'role');
  const name = option(rest, 'name');
  if (sub !== 'create' || !role || !name) {
    process.stderr.write(USAGE);
    return 2;
  }
  if (!(ROLES as readonly string[]).includes(role)) {
    process.stderr.write(`efflux token: role must be one of ${ROLES.join(', ')}, not "${role}"\n`);
    return 2;
  }
  const store = await openStore({ dataDir: dataDir() });
  try {
    const { token, user } = await store.users.createToken(
      SYSTEM_ACTOR,
      name,
      role as Role,
      option(rest, 'label') ?? 'cli',
    );
    process.stdout.write(`${token}\n`);
    process.stderr.write(`token for ${user.name} (${user.role}); it is shown only now\n`);
    return 0;
  } catch (e) {
    process.stderr.write(`efflux token: ${(e as Error).message}\n`);
    return 2;
  } finally {
    await store.close();
  }
}

async function manage(sub: 'list' | 'revoke', rest: string[]): Promise<number> {
  const store = await openStore({ dataDir: dataDir() });
  try {
    if (sub === 'list') {
      const name = option(rest, 'name');
      const userId = name === undefined ? null : (await store.users.personByName(name)).id;
      for (const t of await store.users.tokens(userId)) {
        process.stdout.write(
          `${String(t.id).padStart(4)}  ${t.userName.padEnd(24)} ${t.name.padEnd(16)} created ${t.createdAt}  ${t.revokedAt ? `revoked ${t.revokedAt}` : 'active'}\n`,
        );
      }
      return 0;
    }
    const id = Number(rest[0]);
    if (!Number.isInteger(id) || id <= 0) {
      process.stderr.write(USAGE);
      return 2;
    }
    const t = await store.users.revokeToken(SYSTEM_ACTOR, id);
    process.stdout.write(
      `token ${t.id} of ${t.userName} revoked at ${t.revokedAt}; its sessions ended\n`,
    );
    return 0;
  } catch (e) {
    if (e instanceof ConflictError || e instanceof NotFoundError) {
      process.stderr.write(`efflux token: ${e.message}\n`);
      return 2;
    }
    throw e;
  } finally {
    await store.close();
  }
}
