/**
 * The audit log's action codes in plain words: one table, used by the workbench's audit page (its
 * "What happened" column and its filter) and by the fit report PDF's audit table. The codes stay as
 * they are in the log and its JSON (they are hashed into the chain); only what a person reads
 * changes. test/core/audit/action-labels.test.ts checks that every action the server writes has a
 * label here.
 */

export const ACTION_LABELS: Readonly<Record<string, string>> = {
  'vessel.create': 'Vessel added',
  'vessel.update': 'Vessel file changed (new revision)',
  'test.upload': 'Drain test uploaded',
  'test.withdraw': 'Upload withdrawn',
  'test.retry': 'Analysis asked for again',
  'fit.create': 'Fit made',
  'fit.refit': 'Fit made again (refit)',
  'fit.approve': 'Fit approved',
  'fit.reject': 'Fit rejected',
  'fit.supersede': 'Fit replaced by an approved refit',
  'joint-fit.create': 'Connected-vessel fit stored',
  'joint-fit.approve': 'Connected-vessel fit approved',
  'joint-fit.reject': 'Connected-vessel fit rejected',
  'event.create': 'Maintenance recorded',
  'outlet.status-change': 'Outlet status changed',
  'outlet.interval': 'Outlet test interval changed',
  'session.open': 'Signed in',
  'session.close': 'Signed out',
  'user.create': 'Person added',
  'user.update': 'Role or sites changed',
  'user.revoke': 'Person revoked (sessions ended)',
  'token.create': 'API token created',
  'token.revoke': 'API token revoked (sessions ended)',
  'site.settings': 'Site settings changed (self-review, time zone or test interval)',
  'service.mark-demo': 'Data folder marked as the invented demo',
};

/** The label of an action code; a code with no label yet is written out from its words. */
export function actionLabel(action: string): string {
  const known = ACTION_LABELS[action];
  if (known) return known;
  const words = action.replace(/[.\-_]+/g, ' ').trim();
  return words ? words[0].toUpperCase() + words.slice(1) : action;
}

/** The labelled actions grouped by what they act on (the part before the dot), for a filter. */
export function actionGroups(): { group: string; actions: { action: string; label: string }[] }[] {
  const GROUP_WORDS: Record<string, string> = {
    vessel: 'Vessels',
    test: 'Drain tests',
    fit: 'Fits',
    'joint-fit': 'Fits',
    event: 'Maintenance',
    outlet: 'Outlets',
    session: 'Sign-in',
    user: 'People and tokens',
    token: 'People and tokens',
    site: 'Sites',
    service: 'Service',
  };
  const groups = new Map<string, { action: string; label: string }[]>();
  for (const [action, label] of Object.entries(ACTION_LABELS)) {
    const group = GROUP_WORDS[action.split('.')[0]] ?? 'Other';
    if (!groups.has(group)) groups.set(group, []);
    groups.get(group)!.push({ action, label });
  }
  return [...groups].map(([group, actions]) => ({ group, actions }));
}
