import { createHash, randomBytes } from 'node:crypto';
import type { Actor } from './audit.js';
import type { StoreContext } from './context.js';
import { ConflictError, NotFoundError } from './errors.js';
import { ReadCache } from './read-cache.js';

export const ROLES = ['technician', 'engineer', 'auditor', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export interface User {
  id: number;
  name: string;
  role: Role;
  createdAt: string;
}

interface UserRow {
  id: number;
  name: string;
  role: Role;
  created_at: string;
}
const toUser = (r: UserRow): User => ({ id: r.id, name: r.name, role: r.role, createdAt: r.created_at });

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
   * connection (the CLI) empty it (ForeignWrites). Nothing here revokes tokens or disables users.
   */
  private readonly known: ReadCache<{ user: User; expiresAt: string | null }>;

  constructor(private readonly c: StoreContext) {
    const db = c.db;
    this.known = new ReadCache(c.foreign, 10_000, () => 1);
    this.q = {
      insertUser: db.prepare('INSERT INTO users (name, role, created_at) VALUES (?, ?, ?)'),
      get: db.prepare('SELECT * FROM users WHERE id = ?'),
      byName: db.prepare('SELECT * FROM users WHERE name = ?'),
      count: db.prepare('SELECT count(*) FROM users').pluck(),
      insertToken: db.prepare('INSERT INTO api_tokens (user_id, name, token_hash, created_at) VALUES (?, ?, ?, ?)'),
      byToken: db.prepare(`SELECT u.* FROM api_tokens t JOIN users u ON u.id = t.user_id
        WHERE t.token_hash = ? AND t.revoked_at IS NULL AND u.disabled_at IS NULL`),
      insertSession: db.prepare('INSERT INTO sessions (id_hash, user_id, created_at, expires_at) VALUES (?, ?, ?, ?)'),
      bySession: db.prepare(`SELECT u.*, s.expires_at FROM sessions s JOIN users u ON u.id = s.user_id
        WHERE s.id_hash = ? AND s.expires_at > ? AND u.disabled_at IS NULL`),
      dropSession: db.prepare('DELETE FROM sessions WHERE id_hash = ?'),
    };
  }

  count(): number {
    return this.q.count.get() as number;
  }

  get(id: number): User {
    const row = this.q.get.get(id) as UserRow | undefined;
    if (!row) throw new NotFoundError('user', id);
    return toUser(row);
  }

  /**
   * Creates a user (or reuses one of that name and role) and a new API token for it.
   * Returns the token in clear: this is the only time it exists outside the holder's hands.
   */
  createToken(actor: Actor, userName: string, role: Role, tokenName = 'default'): { user: User; token: string; tokenId: number } {
    return this.c.db
      .transaction(() => {
        const now = this.c.now();
        let row = this.q.byName.get(userName) as UserRow | undefined;
        if (row && row.role !== role) throw new ConflictError(`user "${userName}" exists with role ${row.role}`);
        if (!row) {
          const id = Number(this.q.insertUser.run(userName, role, now).lastInsertRowid);
          row = this.q.get.get(id) as UserRow;
          this.c.audit.append(actor, now, { action: 'user.create', entityType: 'user', entityId: id, after: toUser(row) });
        }
        const token = newSecret('efx');
        const tokenId = Number(this.q.insertToken.run(row.id, tokenName, secretHash(token), now).lastInsertRowid);
        this.c.audit.append(actor, now, {
          action: 'token.create',
          entityType: 'api-token',
          entityId: tokenId,
          after: { userId: row.id, name: tokenName, role },
        });
        return { user: toUser(row), token, tokenId };
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
    const user = Object.freeze(toUser(row)); // shared by every request that presents it
    this.known.set(key, { user, expiresAt: null });
    return user;
  }

  openSession(user: User, ttlMs: number): { secret: string; expiresAt: string } {
    return this.c.db
      .transaction(() => {
        const now = this.c.now();
        const secret = newSecret('efs');
        const expiresAt = new Date(Date.parse(now) + ttlMs).toISOString();
        this.q.insertSession.run(secretHash(secret), user.id, now, expiresAt);
        this.c.audit.append(actorOf(user), now, { action: 'session.open', entityType: 'user', entityId: user.id, after: { expiresAt } });
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
    const user = Object.freeze(toUser(row)); // shared by every request that presents it
    this.known.set(key, { user, expiresAt: row.expires_at });
    return user;
  }

  closeSession(user: User, secret: string): void {
    this.c.db
      .transaction(() => {
        this.known.delete(`s:${secretHash(secret)}`);
        if (this.q.dropSession.run(secretHash(secret)).changes > 0) {
          this.c.audit.append(actorOf(user), this.c.now(), { action: 'session.close', entityType: 'user', entityId: user.id });
        }
      })
      .immediate();
  }
}
