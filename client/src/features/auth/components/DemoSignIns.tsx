import { DEMO_PASSWORD } from '@shared/demo';
import { Button } from '@client/components/Button';
import { useDemoMode } from '../api/auth';

/** Invented demo people, seeded only in the demo and local set-up. */
const demoPeople = [
  { email: 'admin@demo.brink.test', role: 'Administrator' },
  { email: 'coordinator@demo.brink.test', role: 'Temporary works coordinator' },
  { email: 'supervisor@demo.brink.test', role: 'Site supervisor' },
  { email: 'operator@demo.brink.test', role: 'Plant operator' },
];

/** Listed under the sign-in form only when the server says it runs the demo. */
export function DemoSignIns({ onPick }: { onPick: (email: string, password: string) => void }) {
  const demo = useDemoMode();
  if (demo.data !== true) return null;
  return (
    <section aria-labelledby="demo-sign-ins" className="border-t border-rule pt-5">
      <h2 id="demo-sign-ins" className="text-lg font-semibold">
        Demo sign-ins
      </h2>
      <p className="mt-1 text-sm text-ink-soft">
        This server runs the invented demo site. Every demo person's password is{' '}
        <code className="font-semibold text-ink">{DEMO_PASSWORD}</code>.
      </p>
      <ul className="mt-3 flex flex-col gap-2">
        {demoPeople.map((p) => (
          <li key={p.email} className="flex flex-wrap items-center justify-between gap-2">
            <span className="min-w-0 break-words">
              <span className="block font-semibold">{p.role}</span>
              <span className="text-sm text-ink-soft">{p.email}</span>
            </span>
            <Button variant="secondary" onClick={() => onPick(p.email, DEMO_PASSWORD)} aria-label={`Fill in the ${p.role} demo sign-in`}>
              Fill in
            </Button>
          </li>
        ))}
      </ul>
    </section>
  );
}
