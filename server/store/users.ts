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

/** Users, their API tokens and sign-in sessions. */
export class UserRepo {
  private readonly q;
  /**
   * Credentials already checked, by their hash: every request pays one lookup, so a hit skips the
   * join. Only valid ones are kept (a guess never fills it); a session keeps its expiry and is
   * checked against the clock on each hit; closing a session drops it; writes by another
   * connection (the CLI) empty it (ForeignWrites). Revoking a token or a person and changing a person empty it.
   */
  private readonly known: ReadCache<{ user: User; expiresAt: string | null }>;

  constructor(
    private readonly c: StoreContext,
    private readonly sitesRepo: SiteRepo,
  ) {
    const db = c.db;
    this.known = new ReadCache(c.foreign, 10_000, () => 1);
    this.q = {
      sitesOf: db
        .prepare(
          'SELECT s.name FROM user_sites us JOIN sites s ON s.id = us.site_id WHERE us.user_id = ? ORDER BY s.name',
        )
        .pluck(),
      clearSites: db.prepare('DELETE FROM user_sites WHERE user_id = ?'),
      addSite: db.prepare('INSERT OR IGNORE INTO user_sites (user_id, site_id) VALUES (?, ?)'),
      list: db.prepare('SELECT * FROM users ORDER BY name'),
      setRole: db.prepare('UPDATE users SET role = ? WHERE id = ?'),
      disable: db.prepare('UPDATE users SET disabled_at = ? WHERE id = ? AND disabled_at IS NULL'),
      tokenId: db
        .prepare('SELECT id FROM api_tokens WHERE token_hash = ? AND revoked_at IS NULL')
        .pluck(),
      tokens:
        db.prepare(`SELECT t.id, t.user_id, u.name AS user_name, t.name, t.created_at, t.revoked_at FROM api_tokens t
        JOIN users u ON u.id = t.user_id WHERE (@userId IS NULL OR t.user_id = @userId) ORDER BY t.id`),
      token:
        db.prepare(`SELECT t.id, t.user_id, u.name AS user_name, t.name, t.created_at, t.revoked_at FROM api_tokens t
        JOIN users u ON u.id = t.user_id WHERE t.id = ?`),
      revokeToken: db.prepare(
        'UPDATE api_tokens SET revoked_at = ? WHERE id = ? AND revoked_at IS NULL',
      ),
      revokeTokensOf: db.prepare(
        'UPDATE api_tokens SET revoked_at = ? WHERE user_id = ? AND revoked_at IS NULL',
      ),
      dropSessionsOfToken: db.prepare('DELETE FROM sessions WHERE token_id = ?'),
      dropSessionsOf: db.prepare('DELETE FROM sessions WHERE user_id = ?'),
      insertUser: db.prepare('INSERT INTO users (name, role, created_at) VALUES (?, ?, ?)'),
      get: db.prepare('SELECT * FROM users WHERE id = ?'),
      byName: db.prepare('SELECT * FROM users WHERE name = ?'),
      count: db.prepare('SELECT count(*) FROM users').pluck(),
      insertToken: db.prepare(
        'INSERT INTO api_tokens (user_id, name, token_hash, created_at) VALUES (?, ?, ?, ?)',
      ),
      byToken: db.prepare(`SELECT u.* FROM api_tokens t JOIN users u ON u.id = t.user_id
        WHERE t.token_hash = ? AND t.revoked_at IS NULL AND u.disabled_at IS NULL`),
      insertSession: db.prepare(
        'INSERT INTO sessions (id_hash, user_id, created_at, expires_at, token_id) VALUES (?, ?, ?, ?, ?)',
      ),
      bySession:
        db.prepare(`SELECT u.*, s.expires_at FROM sessions s JOIN users u ON u.id = s.user_id
        WHERE s.id_hash = ? AND s.expires_at > ? AND u.disabled_at IS NULL`),
      dropSession: db.prepare('DELETE FROM sessions WHERE id_hash = ?'),
    };
  }

  count(): number {
    return this.q.count.get() as number;
  }

  private toUser(r: UserRow): User {
    const sites = this.q.sitesOf.all(r.id) as string[];
    return {
      id: r.id,
      name: r.name,
      role: r.role,
      createdAt: r.created_at,
      sites: sites.length ? sites : null,
    };
  }

  private toPerson(r: UserRow): Person {
    return { ...this.toUser(r), revokedAt: r.disabled_at };
  }

  get(id: number): User {
    const row = this.q.get.get(id) as UserRow | undefined;
    if (!row) throw new NotFoundError('user', id);
    return this.toUser(row);
  }

  person(id: number): Person {
    const row = this.q.get.get(id) as UserRow | undefined;
    if (!row) throw new NotFoundError('person', id);
    return this.toPerson(row);
  }

  personByName(name: string): Person {
    const row = this.q.byName.get(name) as UserRow | undefined;
    if (!row) throw new NotFoundError('person', name);
    return this.toPerson(row);
  }

  people(): Person[] {
    return (this.q.list.all() as UserRow[]).map((r) => this.toPerson(r));
  }

  private setSites(userId: number, sites: string[] | null | undefined): void {
    this.q.clearSites.run(userId);
    for (const s of sites ?? []) this.q.addSite.run(userId, this.sitesRepo.ensure(s));
  }

  /** A new named person with a role and optional site limits; no credential yet (createTokenFor). */
  addPerson(actor: Actor, name: string, role: Role, sites: string[] | null = null): Person {
    return this.c.db
      .transaction(() => {
        if (this.q.byName.get(name))
          throw new ConflictError(`a person named "${name}" already exists`);
        const now = this.c.now();
        const id = Number(this.q.insertUser.run(name, role, now).lastInsertRowid);
        this.setSites(id, sites);
        const after = this.person(id);
        this.c.audit.append(actor, now, {
          action: 'user.create',
          entityType: 'user',
          entityId: id,
          after,
        });
        return after;
      })
      .immediate();
  }

  /** A new role or new site limits; takes effect on the person's next request (sessions included). */
  changePerson(actor: Actor, id: number, change: PersonChange): Person {
    return this.c.db
      .transaction(() => {
        const before = this.person(id);
        if (before.revokedAt !== null)
          throw new ConflictError(`person ${id} was revoked on ${before.revokedAt}`);
        if (change.role !== undefined) this.q.setRole.run(change.role, id);
        if (change.sites !== undefined) this.setSites(id, change.sites);
        this.known.clear();
        const after = this.person(id);
        this.c.audit.append(actor, this.c.now(), {
          action: 'user.update',
          entityType: 'user',
          entityId: id,
          before,
          after,
        });
        return after;
      })
      .immediate();
  }

  /** Revokes a person: every token revoked and every open session ended, at once. */
  revokePerson(actor: Actor, id: number): Person {
    return this.c.db
      .transaction(() => {
        const before = this.person(id);
        if (before.revokedAt !== null)
          throw new ConflictError(`person ${id} was already revoked on ${before.revokedAt}`);
        const now = this.c.now();
        this.q.disable.run(now, id);
        this.q.revokeTokensOf.run(now, id);
        const ended = this.q.dropSessionsOf.run(id).changes;
        this.known.clear();
        const after = this.person(id);
        this.c.audit.append(actor, now, {
          action: 'user.revoke',
          entityType: 'user',
          entityId: id,
          before,
          after: { ...after, sessionsEnded: ended },
        });
        return after;
      })
      .immediate();
  }

  /** A new API token for an existing, not revoked person; the token in clear is returned this once. */
  createTokenFor(
    actor: Actor,
    userId: number,
    tokenName = 'default',
  ): { user: User; token: string; tokenId: number } {
    return this.c.db
      .transaction(() => {
        const p = this.person(userId);
        if (p.revokedAt !== null)
          throw new ConflictError(`person ${userId} was revoked on ${p.revokedAt}`);
        const now = this.c.now();
        const token = newSecret('efx');
        const tokenId = Number(
          this.q.insertToken.run(userId, tokenName, secretHash(token), now).lastInsertRowid,
        );
        this.c.audit.append(actor, now, {
          action: 'token.create',
          entityType: 'api-token',
          entityId: tokenId,
          after: { userId, name: tokenName, role: p.role },
        });
        return { user: this.get(userId), token, tokenId };
      })
      .immediate();
  }

  tokens(userId: number | null = null): TokenInfo[] {
    return (this.q.tokens.all({ userId }) as TokenRow[]).map(toToken);
  }

  token(id: number): TokenInfo {
    const r = this.q.token.get(id) as TokenRow | undefined;
    if (!r) throw new NotFoundError('token', id);
    return toToken(r);
  }

  /** Revokes one token and ends every session opened with it, at once. */
  revokeToken(actor: Actor, tokenId: number): TokenInfo {
    return this.c.db
      .transaction(() => {
        const before = this.token(tokenId);
        if (before.revokedAt !== null)
          throw new ConflictError(`token ${tokenId} was already revoked on ${before.revokedAt}`);
        const now = this.c.now();
        this.q.revokeToken.run(now, tokenId);
        const ended = this.q.dropSessionsOfToken.run(tokenId).changes;
        this.known.clear();
        const after = this.token(tokenId);
        this.c.audit.append(actor, now, {
          action: 'token.revoke',
          entityType: 'api-token',
          entityId: tokenId,
          before,
          after: { ...after, sessionsEnded: ended },
        });
        return after;
      })
      .immediate();
  }

  /**
   * Creates a user (or reuses one of that name and role) and a new API token for it.
   * Returns the token in clear: this is the only time it exists outside the holder's hands.
   */
  createToken(
    actor: Actor,
    userName: string,
    role: Role,
    tokenName = 'default',
  ): { user: User; token: string; tokenId: number } {
    return this.c.db
      .transaction(() => {
        const now = this.c.now();
        let row = this.q.byName.get(userName) as UserRow | undefined;
        if (row && row.role !== role)
          throw new ConflictError(`user "${userName}" exists with role ${row.role}`);
        if (!row) {
          const id = Number(this.q.insertUser.run(userName, role, now).lastInsertRowid);
          row = this.q.get.get(id) as UserRow;
          this.c.audit.append(actor, now, {
            action: 'user.create',
            entityType: 'user',
            entityId: id,
            after: this.toUser(row),
          });
        }
        const token = newSecret('efx');
        const tokenId = Number(
          this.q.insertToken.run(row.id, tokenName, secretHash(token), now).lastInsertRowid,
        );
        this.c.audit.append(actor, now, {
          action: 'token.create',
          entityType: 'api-token',
          entityId: tokenId,
          after: { userId: row.id, name: tokenName, role },
        });
        return { user: this.toUser(row), token, tokenId };
      })
      .immediate();
  }

  byToken(token: string): User | null {
    const hash = secretHash(token);
    const key = `t:${hash}`;
    const hit = this.known.get(key);
    if (hit) return hit.user;
    const row = this.q.byToken.get(hash) as UserRow | undefined;
    if (!row) return null;
    const user = Object.freeze(this.toUser(row)); // shared by every request that presents it
    this.known.set(key, { user, expiresAt: null });
    return user;
  }

  /** Sign-in: a valid token opens a session tied to it (revoking the token ends the session). */
  signIn(token: string, ttlMs: number): { user: User; secret: string; expiresAt: string } | null {
    const user = this.byToken(token);
    const tokenId = this.q.tokenId.get(secretHash(token)) as number | undefined;
    if (!user || tokenId === undefined) return null;
    return { user, ...this.openSession(user, ttlMs, tokenId) };
  }

  openSession(
    user: User,
    ttlMs: number,
    tokenId: number | null = null,
  ): { secret: string; expiresAt: string } {
    return this.c.db
      .transaction(() => {
        const now = this.c.now();
        const secret = newSecret('efs');
        const expiresAt = new Date(Date.parse(now) + ttlMs).toISOString();
        this.q.insertSession.run(secretHash(secret), user.id, now, expiresAt, tokenId);
        this.c.audit.append(actorOf(user), now, {
          action: 'session.open',
          entityType: 'user',
          entityId: user.id,
          after: { expiresAt },
        });
        return { secret, expiresAt };
      })
      .immediate();
  }

  bySession(secret: string): User | null {
    const hash = secretHash(secret);
    const key = `s:${hash}`;
    const now = this.c.now();
    const hit = this.known.get(key);
    if (hit && hit.expiresAt! > now) return hit.user; // the same comparison as the query's
    const row = this.q.bySession.get(hash, now) as (UserRow & { expires_at: string }) | undefined;
    if (!row) {
      this.known.delete(key);
      return null;
    }
    const user = Object.freeze(this.toUser(row)); // shared by every request that presents it
    this.known.set(key, { user, expiresAt: row.expires_at });
    return user;
  }

  closeSession(user: User, secret: string): void {
    this.c.db
      .transaction(() => {
        this.known.delete(`s:${secretHash(secret)}`);
        if (this.q.dropSession.run(secretHash(secret)).changes > 0) {
          this.c.audit.append(actorOf(user), this.c.now(), {
            action: 'session.close',
            entityType: 'user',
            entityId: user.id,
          });
        }
      })
      .immediate();
  }
}
