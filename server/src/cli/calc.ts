/**
 * `npm run --silent calc -- FILE` (FILE a path, or `-` for standard input): reads one calculation
 * request or a list of them (docs/calculation.md, "Command line") and prints one result or a list, as JSON, on
 * standard output. Bad input: exit 2, one line per wrong field on standard error, nothing on
 * standard output. Any other failure: exit 1.
 */
import { readFileSync } from 'node:fs';
import { runCheck } from '@shared/engineering';
import { parseCalcRequest, type CalcRequest } from '@shared/schemas/calc';

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
  const requests: CalcRequest[] = [];
  const errors: string[] = [];
  items.forEach((item, i) => {
    const parsed = parseCalcRequest(item, many ? `[${i}]` : '');
    if (parsed.ok) requests.push(parsed.value);
    else errors.push(...parsed.errors);
  });
  if (errors.length > 0) fail(2, errors);
  const results = requests.map((r) => runCheck(r));
  process.stdout.write(JSON.stringify(many ? results : results[0], null, 2) + '\n');
}

try {
  main(process.argv.slice(2));
} catch (e) {
  fail(1, [`calc: internal error: ${(e as Error).message}`]);
}
