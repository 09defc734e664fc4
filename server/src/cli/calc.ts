/**
 * `npm run --silent calc -- FILE` (FILE a path, or `-` for standard input): reads one calculation
 * request or a list of them (docs/calculation.md, "Command line") and prints one result or a list, as JSON, on
 * standard output. Bad input: exit 2, one line per wrong field on standard error, nothing on
 * standard output. Any other failure: exit 1. `"units": "us"` in a request reads and answers it in feet and
 * pounds (shared/schemas/calcUnits.ts); the engine itself works in SI.
 */
import { readFileSync } from 'node:fs';
import { runCheck } from '@shared/engineering';
import { parseCalcRequest, type CalcRequest } from '@shared/schemas/calc';
import { requestInSI, resultInUs } from '@shared/schemas/calcUnits';
import { localizeWords, type UnitSystem } from '@shared/units';

function fail(code: number, lines: string[]): never {
  process.stderr.write(lines.join('\n') + '\n');
  process.exit(code);
}

function main(argv: string[]): void {
  if (argv.length !== 1) fail(2, ['usage: npm run --silent calc -- FILE   (FILE a path to a JSON request, or - for standard input)']);
  const source = argv[0];
  let text: string;
  try {
    text = readFileSync(source === '-' ? 0 : source, 'utf8');
  } catch (e) {
    fail(2, [`input: cannot read ${source === '-' ? 'standard input' : source}: ${(e as Error).message}`]);
  }
  let input: unknown;
  try {
    input = JSON.parse(text);
  } catch (e) {
    fail(2, [`input: not valid JSON (${(e as Error).message}); numbers must be finite, written as digits`]);
  }
  const many = Array.isArray(input);
  const items: unknown[] = many ? (input as unknown[]) : [input];
  if (many && items.length === 0) fail(2, ['input: the list of requests is empty']);
  const requests: { units: UnitSystem; request: CalcRequest }[] = [];
  const errors: string[] = [];
  items.forEach((item, i) => {
    const prefix = many ? `[${i}]` : '';
    const chosen = requestInSI(item, prefix);
    if (!chosen.ok) return errors.push(chosen.error);
    const parsed = parseCalcRequest(chosen.request, prefix);
    // A US request's refusals name its limits in feet and pounds.
    if (parsed.ok) requests.push({ units: chosen.units, request: parsed.value });
    else errors.push(...parsed.errors.map((e) => localizeWords(e, chosen.units)));
  });
  if (errors.length > 0) fail(2, errors);
  const results = requests.map(({ units, request }) => (units === 'us' ? resultInUs(runCheck(request)) : runCheck(request)));
  process.stdout.write(JSON.stringify(many ? results : results[0], null, 2) + '\n');
}

try {
  main(process.argv.slice(2));
} catch (e) {
  fail(1, [`calc: internal error: ${(e as Error).message}`]);
}
