/**
 * Canonical JSON for hashing (the audit chain, stored fits' result hashes): core's function, so
 * the store and the report ids follow one set of rules. Before, the store kept its own copy, which
 * differed only on function-valued members (null here, dropped in core); nothing the store hashes
 * holds a function, and test/core/report/canonical-store.test.ts checks that core's output equals
 * the old rules on numbers, unicode, nested arrays and undefined members, so existing chains verify.
 */
export { canonicalJson } from '../core/report/canonical.js';
