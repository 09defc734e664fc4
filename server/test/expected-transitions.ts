/**
 * The permit transitions a person may make through the API, written out by hand from the product's
 * permit life (docs/), not read from shared/schemas/permits.ts: the tests compare the server with
 * this list, so a wrong edit of the server's table fails them. One line each:
 * action, from status, to status, the site role that may take it.
 * Anything not listed is refused: 403 for a role that never takes the action (and for everyone on
 * the actions only Brink takes: start, lapse, reconsider), 409 for a role that takes it from
 * other statuses.
 */
const allowedText = `
  submit     draft      submitted    supervisor
  submit     returned   submitted    supervisor
  approve    submitted  approved     coordinator
  return     submitted  returned     coordinator
  decline    submitted  declined     coordinator
  suspend    live       suspended    coordinator
  resume     suspended  live         coordinator
  hand_back  live       handed_back  supervisor
  hand_back  suspended  handed_back  supervisor
  revise     approved   draft        supervisor
  revise     live       draft        supervisor
  revise     suspended  draft        supervisor
  withdraw   draft      withdrawn    supervisor
  withdraw   submitted  withdrawn    supervisor
  withdraw   returned   withdrawn    supervisor
  withdraw   approved   withdrawn    supervisor
`;

interface ExpectedTransition {
  action: string;
  from: string;
  to: string;
  by: string;
}

export const allowedTransitions: ExpectedTransition[] = allowedText
  .trim()
  .split('\n')
  .map((line) => {
    const [action, from, to, by] = line.trim().split(/\s+/);
    return { action, from, to, by };
  });

/** The role that may take an action from some status, or none (actions only Brink takes). */
export function roleFor(action: string): string | null {
  return allowedTransitions.find((t) => t.action === action)?.by ?? null;
}

/** Actions that must carry a reason, and decisions signed with the password again. */
export const needsReason = ['return', 'decline', 'suspend', 'resume', 'revise'];
export const signedActions = ['approve', 'return', 'decline'];
