/**
 * The one safety caution Brink shows wherever a result can hurt someone: page footers and check panels,
 * the phone view, e-mails, the printed permit, the inspection report, the API description and the
 * command-line calculation. A person or site in US customary units reads it with the US rule named.
 */
export const CAUTION =
  "Brink's figures aid a competent temporary works designer or coordinator and never replace the support's design. " +
  'Local regulations and licensed practice prevail.';

/** The caution for work under OSHA (US customary units): the same words, with the federal rule for excavations. */
const US_CAUTION = `${CAUTION} In the United States, OSHA 29 CFR 1926 Subpart P (Excavations) applies.`;

/** The caution for a person's or site's units (`metric` | `us`). */
export function cautionFor(units: string | null | undefined): string {
  return units === 'us' ? US_CAUTION : CAUTION;
}
