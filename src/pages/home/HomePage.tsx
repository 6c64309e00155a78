import { Link } from 'react-router';
import { ROLE_LABELS } from '../../../shared/roles';
import { allowedTasks } from '../../auth/areas';
import { ROLE_DESCRIPTIONS } from '../../auth/roleDescriptions';
import { useAuth } from '../../auth/AuthProvider';
import { useAppAbility } from '../../auth/useAppAbility';
import { PageHeader } from '../../components/ui';

export function HomePage() {
  const { user } = useAuth();
  const ability = useAppAbility();
  const tasks = allowedTasks(ability);
  if (!user) return null;
  const firstName = user.name.split(' ')[0];
  return (
    <div>
      <title>Home · Tocsin</title>
      <PageHeader
        title={`Good to see you, ${firstName}`}
        intro={
          <p>
            Signed in as <strong className="font-semibold text-ink">{ROLE_LABELS[user.role]}</strong> ({user.email}).{' '}
            {ROLE_DESCRIPTIONS[user.role]}
          </p>
        }
      />
      <section aria-labelledby="tasks-heading">
        <h2 id="tasks-heading" className="text-xl font-bold">
          What you can do now
        </h2>
        {tasks.length === 0 ? (
          <p className="mt-3 text-ink-soft">There is nothing for your role to do in Tocsin yet.</p>
        ) : (
          <ul className="mt-4 grid gap-4 sm:grid-cols-2 lg:grid-cols-3" data-testid="tasks">
            {tasks.map((t) => (
              <li key={t.title}>
                <Link
                  to={t.to}
                  className="group block h-full rounded-lg border border-rule bg-white p-5 text-ink no-underline shadow-xs transition-colors hover:border-accent-600 hover:bg-accent-50"
                >
                  <span className="font-serif text-lg font-bold text-accent-800 group-hover:underline">{t.title}</span>
                  <span className="mt-2 block text-sm leading-relaxed text-ink-soft">{t.description}</span>
                </Link>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
