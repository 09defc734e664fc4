import { verdictRule, type Verdict } from '@shared/schemas/permits';

/** ISO 3864 safety colours: red prohibition/danger, yellow warning, green safe condition. */
export const verdictColours: Record<Verdict, string> = { fails: '#c1121f', close: '#f4c20d', passes: '#00804a' };
const words: Record<Verdict, string> = { fails: 'Fails: overloads the support', close: 'Passes, close to the limit', passes: 'Passes' };

/** The verdict in words beside its colour (never colour alone), with the utilisation. */
export function VerdictBadge({ verdict, utilisation }: { verdict: Verdict; utilisation: number | null }) {
  return (
    <span className="inline-flex items-center gap-2 font-semibold" data-verdict={verdict}>
      <span aria-hidden className="inline-block size-4 rounded-sm border border-ink/40" style={{ background: verdictColours[verdict] }} />
      {words[verdict]}
      <span className="font-normal text-ink-soft">(utilisation {utilisation === null ? 'no allowance' : utilisation.toFixed(2)})</span>
    </span>
  );
}

export function VerdictRule() {
  return <p className="text-sm text-ink-soft">{verdictRule}</p>;
}
