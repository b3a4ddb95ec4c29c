import { createHash, randomBytes } from 'node:crypto';
import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';
import { ConflictError, NotFoundError } from './errors.js';
import type { SiteRepo } from './sites.js';
import { ReadCache } from './read-cache.js';

export const ROLES = ['technician', 'engineer', 'auditor', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export interface User {
  id: number;
  name: string;
  role: Role;
  createdAt: string;
  /** The sites this person may see and act on; null = every site. */
  sites: string[] | null;
}

/** A person as admins see them: with the time they were revoked. */
export interface Person extends User {
  revokedAt: string | null;
}

export interface TokenInfo {
  id: number;
  userId: number;
  userName: string;
  name: string;
  createdAt: string;
  revokedAt: string | null;
}

interface UserRow {
  id: number;
  name: string;
  role: Role;
  created_at: string;
  disabled_at: string | null;
}

interface TokenRow {
  id: number;
  user_id: number;
  user_name: string;
  name: string;
  created_at: string;
  revoked_at: string | null;
}
const toToken = (r: TokenRow): TokenInfo => ({
  id: r.id,
  userId: r.user_id,
  userName: r.user_name,
  name: r.name,
  createdAt: r.created_at,
  revokedAt: r.revoked_at,
});

/** What a person may be changed to. */
export interface PersonChange {
  role?: Role;
  /** null or [] = every site. */
  sites?: string[] | null;
}

/** Secrets are stored only as their SHA-256: a copy of the database gives no working credential. */
export function secretHash(secret: string): string {
  return createHash('sha256').update(secret).digest('hex');
}

function newSecret(prefix: string): string {
  return `${prefix}_${randomBytes(32).toString('base64url')}`;
}

export const actorOf = (u: User): Actor => ({ id: u.id, name: u.name });

const TOKEN_COLS = `SELECT t.id, t.user_id, u.name AS user_name, t.name, t.created_at, t.revoked_at FROM api_tokens t
  JOIN users u ON u.id = t.user_id`;
const INSERT_USER = 'INSERT INTO users (name, role, created_at) VALUES (?, ?, ?) RETURNING id';
const INSERT_TOKEN =
  'INSERT INTO api_tokens (user_id, name, token_hash, created_at) VALUES (?, ?, ?, ?) RETURNING id';

/** Users, their API tokens and sign-in sessions. */
export class UserRepo {
  /**
   * Credentials already checked, by their hash: every request pays one lookup, so a hit skips the
   * join. Only valid ones are kept (a guess never fills it); a session keeps its expiry and is
   * checked against the clock on each hit; closing a session drops it; writes by another
   * connection (the CLI) empty it (ForeignWrites). Revoking a token or a person and changing a
   * person empty it (in the transaction and again after its commit).
   */
  private readonly known: ReadCache<{ user: User; expiresAt: string | null }>;

  constructor(
    private readonly c: StoreContext,
    private readonly sitesRepo: SiteRepo,
  ) {
    this.known = new ReadCache(c.foreign, 10_000, () => 1);
  }

  /** A write that changes who may do what: the known credentials are dropped inside and after it. */
  private async forgetting<T>(fn: () => Promise<T>): Promise<T> {
    const out = await this.c.sql.tx(fn);
    this.known.clear();
    return out;
  }

  async count(): Promise<number> {
    return Number(await this.c.sql.value('SELECT count(*) FROM users'));
  }

  private async toUser(r: UserRow): Promise<User> {
    const sites = (
      await this.c.sql.all<{ name: string }>(
        'SELECT s.name FROM user_sites us JOIN sites s ON s.id = us.site_id WHERE us.user_id = ? ORDER BY s.name',
        [r.id],
      )
    ).map((x) => x.name);
    return {
      id: r.id,
      name: r.name,
      role: r.role,
      createdAt: r.created_at,
      sites: sites.length ? sites : null,
    };
  }

  private async toPerson(r: UserRow): Promise<Person> {
    return { ...(await this.toUser(r)), revokedAt: r.disabled_at };
  }

  private userRow(id: number): Promise<UserRow | undefined> {
    return this.c.sql.get<UserRow>('SELECT * FROM users WHERE id = ?', [id]);
  }

  private userByName(name: string): Promise<UserRow | undefined> {
    return this.c.sql.get<UserRow>('SELECT * FROM users WHERE name = ?', [name]);
  }

  async get(id: number): Promise<User> {
    const row = await this.userRow(id);
    if (!row) throw new NotFoundError('user', id);
    return this.toUser(row);
  }

  async person(id: number): Promise<Person> {
    const row = await this.userRow(id);
    if (!row) throw new NotFoundError('person', id);
    return this.toPerson(row);
  }

  async personByName(name: string): Promise<Person> {
    const row = await this.userByName(name);
    if (!row) throw new NotFoundError('person', name);
    return this.toPerson(row);
  }

  async people(): Promise<Person[]> {
    const rows = await this.c.sql.all<UserRow>('SELECT * FROM users ORDER BY name');
    const out: Person[] = [];
    for (const r of rows) out.push(await this.toPerson(r));
    return out;
  }

  private async setSites(userId: number, sites: string[] | null | undefined): Promise<void> {
    await this.c.sql.run('DELETE FROM user_sites WHERE user_id = ?', [userId]);
    for (const s of sites ?? [])
      await this.c.sql.run(
        'INSERT INTO user_sites (user_id, site_id) VALUES (?, ?) ON CONFLICT DO NOTHING',
        [userId, await this.sitesRepo.ensure(s)],
      );
  }

  /** A new named person with a role and optional site limits; no credential yet (createTokenFor). */
  async addPerson(
    actor: Actor,
    name: string,
    role: Role,
    sites: string[] | null = null,
  ): Promise<Person> {
    return this.c.sql.tx(async () => {
      if (await this.userByName(name))
        throw new ConflictError(`a person named "${name}" already exists`);
      const now = this.c.now();
      const id = Number(await this.c.sql.value(INSERT_USER, [name, role, now]));
      await this.setSites(id, sites);
      const after = await this.person(id);
      await this.c.audit.append(actor, now, {
        action: 'user.create',
        entityType: 'user',
        entityId: id,
        after,
      });
      return after;
    });
  }

  /** A new role or new site limits; takes effect on the person's next request (sessions included). */
  async changePerson(actor: Actor, id: number, change: PersonChange): Promise<Person> {
    return this.forgetting(async () => {
      const before = await this.person(id);
      if (before.revokedAt !== null)
        throw new ConflictError(`person ${id} was revoked on ${before.revokedAt}`);
      if (change.role !== undefined)
        await this.c.sql.run('UPDATE users SET role = ? WHERE id = ?', [change.role, id]);
      if (change.sites !== undefined) await this.setSites(id, change.sites);
      this.known.clear();
      const after = await this.person(id);
      await this.c.audit.append(actor, this.c.now(), {
        action: 'user.update',
        entityType: 'user',
        entityId: id,
        before,
        after,
      });
      return after;
    });
  }

  /** Revokes a person: every token revoked and every open session ended, at once. */
  async revokePerson(actor: Actor, id: number): Promise<Person> {
    return this.forgetting(async () => {
      const before = await this.person(id);
      if (before.revokedAt !== null)
        throw new ConflictError(`person ${id} was already revoked on ${before.revokedAt}`);
      const now = this.c.now();
      await this.c.sql.run(
        'UPDATE users SET disabled_at = ? WHERE id = ? AND disabled_at IS NULL',
        [now, id],
      );
      await this.c.sql.run(
        'UPDATE api_tokens SET revoked_at = ? WHERE user_id = ? AND revoked_at IS NULL',
        [now, id],
      );
      const ended = (await this.c.sql.run('DELETE FROM sessions WHERE user_id = ?', [id])).changes;
      this.known.clear();
      const after = await this.person(id);
      await this.c.audit.append(actor, now, {
        action: 'user.revoke',
        entityType: 'user',
        entityId: id,
        before,
        after: { ...after, sessionsEnded: ended },
      });
      return after;
    });
  }

  /** A new API token for an existing, not revoked person; the token in clear is returned this once. */
  async createTokenFor(
    actor: Actor,
    userId: number,
    tokenName = 'default',
  ): Promise<{ user: User; token: string; tokenId: number }> {
    return this.c.sql.tx(async () => {
      const p = await this.person(userId);
      if (p.revokedAt !== null)
        throw new ConflictError(`person ${userId} was revoked on ${p.revokedAt}`);
      const now = this.c.now();
      const token = newSecret('efx');
      const tokenId = Number(
        await this.c.sql.value(INSERT_TOKEN, [userId, tokenName, secretHash(token), now]),
      );
      await this.c.audit.append(actor, now, {
        action: 'token.create',
        entityType: 'api-token',
        entityId: tokenId,
        after: { userId, name: tokenName, role: p.role },
      });
      return { user: await this.get(userId), token, tokenId };
    });
  }

  async tokens(userId: number | null = null): Promise<TokenInfo[]> {
    return (
      await this.c.sql.all<TokenRow>(
        `${TOKEN_COLS} WHERE (@userId IS NULL OR t.user_id = @userId) ORDER BY t.id`,
        { userId },
      )
    ).map(toToken);
  }

  async token(id: number): Promise<TokenInfo> {
    const r = await this.c.sql.get<TokenRow>(`${TOKEN_COLS} WHERE t.id = ?`, [id]);
    if (!r) throw new NotFoundError('token', id);
    return toToken(r);
  }

  /** Revokes one token and ends every session opened with it, at once. */
  async revokeToken(actor: Actor, tokenId: number): Promise<TokenInfo> {
    return this.forgetting(async () => {
      const before = await this.token(tokenId);
      if (before.revokedAt !== null)
        throw new ConflictError(`token ${tokenId} was already revoked on ${before.revokedAt}`);
      const now = this.c.now();
      await this.c.sql.run(
        'UPDATE api_tokens SET revoked_at = ? WHERE id = ? AND revoked_at IS NULL',
        [now, tokenId],
      );
      const ended = (await this.c.sql.run('DELETE FROM sessions WHERE token_id = ?', [tokenId]))
        .changes;
      this.known.clear();
      const after = await this.token(tokenId);
      await this.c.audit.append(actor, now, {
        action: 'token.revoke',
        entityType: 'api-token',
        entityId: tokenId,
        before,
        after: { ...after, sessionsEnded: ended },
      });
      return after;
    });
  }

  /**
   * Creates a user (or reuses one of that name and role) and a new API token for it.
   * Returns the token in clear: this is the only time it exists outside the holder's hands.
   */
  async createToken(
    actor: Actor,
    userName: string,
    role: Role,
    tokenName = 'default',
  ): Promise<{ user: User; token: string; tokenId: number }> {
    return this.c.sql.tx(async () => {
      const now = this.c.now();
      let row = await this.userByName(userName);
      if (row && row.role !== role)
        throw new ConflictError(`user "${userName}" exists with role ${row.role}`);
      if (!row) {
        const id = Number(await this.c.sql.value(INSERT_USER, [userName, role, now]));
        row = (await this.userRow(id))!;
        await this.c.audit.append(actor, now, {
          action: 'user.create',
          entityType: 'user',
          entityId: id,
          after: await this.toUser(row),
        });
      }
      const token = newSecret('efx');
      const tokenId = Number(
        await this.c.sql.value(INSERT_TOKEN, [row.id, tokenName, secretHash(token), now]),
      );
      await this.c.audit.append(actor, now, {
        action: 'token.create',
        entityType: 'api-token',
        entityId: tokenId,
        after: { userId: row.id, name: tokenName, role },
      });
      return { user: await this.toUser(row), token, tokenId };
    });
  }

  async byToken(token: string): Promise<User | null> {
    const hash = secretHash(token);
    const key = `t:${hash}`;
    const hit = await this.known.get(key);
    if (hit) return hit.user;
    const since = this.known.generation;
    const row = await this.c.sql.get<UserRow>(
      `SELECT u.* FROM api_tokens t JOIN users u ON u.id = t.user_id
      WHERE t.token_hash = ? AND t.revoked_at IS NULL AND u.disabled_at IS NULL`,
      [hash],
    );
    if (!row) return null;
    const user = Object.freeze(await this.toUser(row)); // shared by every request that presents it
    await this.known.set(key, { user, expiresAt: null }, since);
    return user;
  }

  /** Sign-in: a valid token opens a session tied to it (revoking the token ends the session). */
  async signIn(
    token: string,
    ttlMs: number,
  ): Promise<{ user: User; secret: string; expiresAt: string } | null> {
    const user = await this.byToken(token);
    const tokenId = await this.c.sql.value(
      'SELECT id FROM api_tokens WHERE token_hash = ? AND revoked_at IS NULL',
      [secretHash(token)],
    );
    if (!user || tokenId === undefined) return null;
    return { user, ...(await this.openSession(user, ttlMs, Number(tokenId))) };
  }

  async openSession(
    user: User,
    ttlMs: number,
    tokenId: number | null = null,
  ): Promise<{ secret: string; expiresAt: string }> {
    return this.c.sql.tx(async () => {
      const now = this.c.now();
      const secret = newSecret('efs');
      const expiresAt = new Date(Date.parse(now) + ttlMs).toISOString();
      await this.c.sql.run(
        'INSERT INTO sessions (id_hash, user_id, created_at, expires_at, token_id) VALUES (?, ?, ?, ?, ?)',
        [secretHash(secret), user.id, now, expiresAt, tokenId],
      );
      await this.c.audit.append(actorOf(user), now, {
        action: 'session.open',
        entityType: 'user',
        entityId: user.id,
        after: { expiresAt },
      });
      return { secret, expiresAt };
    });
  }

  async bySession(secret: string): Promise<User | null> {
    const hash = secretHash(secret);
    const key = `s:${hash}`;
    const now = this.c.now();
    const hit = await this.known.get(key);
    if (hit && hit.expiresAt! > now) return hit.user; // the same comparison as the query's
    const since = this.known.generation;
    const row = await this.c.sql.get<UserRow & { expires_at: string }>(
      `SELECT u.*, s.expires_at FROM sessions s JOIN users u ON u.id = s.user_id
      WHERE s.id_hash = ? AND s.expires_at > ? AND u.disabled_at IS NULL`,
      [hash, now],
    );
    if (!row) {
      if (hit) this.known.delete(key); // expired
      return null;
    }
    const user = Object.freeze(await this.toUser(row)); // shared by every request that presents it
    await this.known.set(key, { user, expiresAt: row.expires_at }, since);
    return user;
  }

  async closeSession(user: User, secret: string): Promise<void> {
    const key = `s:${secretHash(secret)}`;
    await this.c.sql.tx(async () => {
      this.known.delete(key);
      if (
        (await this.c.sql.run('DELETE FROM sessions WHERE id_hash = ?', [secretHash(secret)]))
          .changes > 0
      ) {
        await this.c.audit.append(actorOf(user), this.c.now(), {
          action: 'session.close',
          entityType: 'user',
          entityId: user.id,
        });
      }
    });
    this.known.delete(key); // committed: see ReadCache
  }
}
