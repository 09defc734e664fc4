/**
 * The one caution Brink shows wherever a result can hurt someone: page footers and check panels,
 * the phone view, e-mails, the printed permit, the inspection report, the API description and the
 * command-line calculation.
 */
export const CAUTION =
  "Brink's figures aid a competent temporary works designer or coordinator and never replace the support's design. " +
  'Local regulations and licensed practice prevail.';
