/**
 * `efflux people add|change|list|revoke` and `efflux site self-review` (admins at the machine):
 * the same store calls as the workbench's People page, recorded in the audit log as the system.
 */
import {
  ConflictError,
  NotFoundError,
  openStore,
  ROLES,
  SYSTEM_ACTOR,
  type Person,
  type Role,
} from '../store/index.js';
import { dataDir } from './serve-config.js';

const USAGE = `usage:
  efflux people list
  efflux people add NAME --role ROLE [--sites S1,S2] [--token LABEL]   (--token also prints a first token)
  efflux people change NAME [--role ROLE] [--sites S1,S2 | --all-sites]
  efflux people revoke NAME            (every token revoked, every open session ended)
  efflux site self-review SITE on|off  (four eyes waived for a site with one qualified person; marked)
roles: ${ROLES.join(', ')}`;

function option(argv: string[], name: string): string | undefined {
  const i = argv.indexOf(`--${name}`);
  if (i >= 0) return argv[i + 1];
  return argv.find((a) => a.startsWith(`--${name}=`))?.slice(name.length + 3);
}

function role(text: string | undefined): Role | undefined {
  if (text === undefined) return undefined;
  if (!(ROLES as readonly string[]).includes(text))
    throw new RangeError(`--role must be one of ${ROLES.join(', ')}, not "${text}"`);
  return text as Role;
}

const sitesOpt = (argv: string[]) =>
  option(argv, 'sites')
    ?.split(',')
    .map((s) => s.trim())
    .filter(Boolean);
const line = (p: Person) =>
  `${String(p.id).padStart(4)}  ${p.name.padEnd(24)} ${p.role.padEnd(11)} ${(p.sites?.join(',') ?? 'every site').padEnd(24)} ${p.revokedAt ? `revoked ${p.revokedAt}` : 'active'}`;

export async function run(argv: string[]): Promise<number> {
  const [sub, name, ...rest] = argv;
  if (!sub || sub === '--help') {
    process.stdout.write(`${USAGE}\n`);
    return sub ? 0 : 2;
  }
  const store = await openStore({ dataDir: dataDir() });
  try {
    switch (sub) {
      case 'list':
        for (const p of await store.users.people()) process.stdout.write(`${line(p)}\n`);
        return 0;
      case 'add': {
        if (!name || name.startsWith('--'))
          throw new RangeError('name the person: efflux people add NAME --role ROLE');
        const r = role(option(rest, 'role'));
        if (!r) throw new RangeError('--role is required');
        const p = await store.users.addPerson(SYSTEM_ACTOR, name, r, sitesOpt(rest) ?? null);
        process.stdout.write(`${line(p)}\n`);
        const label = option(rest, 'token');
        if (label !== undefined) {
          const { token } = await store.users.createTokenFor(SYSTEM_ACTOR, p.id, label);
          process.stdout.write(`${token}\n`);
          process.stderr.write(`token for ${p.name}; it is shown only now\n`);
        }
        return 0;
      }
      case 'change': {
        const p = await store.users.personByName(name ?? '');
        const sites = rest.includes('--all-sites') ? null : sitesOpt(rest);
        const changed = await store.users.changePerson(SYSTEM_ACTOR, p.id, {
          role: role(option(rest, 'role')),
          ...(sites !== undefined ? { sites } : {}),
        });
        process.stdout.write(`${line(changed)}\n`);
        return 0;
      }
      case 'revoke': {
        const p = await store.users.revokePerson(
          SYSTEM_ACTOR,
          (await store.users.personByName(name ?? '')).id,
        );
        process.stdout.write(`${line(p)}\n`);
        return 0;
      }
      default:
        process.stderr.write(`efflux people: unknown "${sub}"\n${USAGE}\n`);
        return 2;
    }
  } catch (e) {
    if (e instanceof RangeError || e instanceof ConflictError || e instanceof NotFoundError) {
      process.stderr.write(`efflux people: ${e.message}\n`);
      return 2;
    }
    throw e;
  } finally {
    await store.close();
  }
}

/** `efflux site self-review SITE on|off`. */
export async function runSite(argv: string[]): Promise<number> {
  const [sub, site, onOff] = argv;
  if (sub !== 'self-review' || !site || (onOff !== 'on' && onOff !== 'off')) {
    process.stderr.write('usage: efflux site self-review SITE on|off\n');
    return 2;
  }
  const store = await openStore({ dataDir: dataDir() });
  try {
    const s = await store.sites.setSelfReview(SYSTEM_ACTOR, site, onOff === 'on');
    process.stdout.write(
      `site "${s.name}": self-review ${s.selfReviewAllowed ? 'allowed (each one marked in the audit log and on reports)' : 'not allowed (four eyes)'}\n`,
    );
    return 0;
  } catch (e) {
    if (e instanceof NotFoundError) {
      process.stderr.write(`efflux site: ${e.message}\n`);
      return 2;
    }
    throw e;
  } finally {
    await store.close();
  }
}
