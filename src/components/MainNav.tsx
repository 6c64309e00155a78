// Primary navigation: Home plus every area the signed-in user's ability allows.
import { NavLink } from 'react-router';
import { allowedAreas } from '../auth/areas';
import { useAppAbility } from '../auth/useAppAbility';

const linkClass = ({ isActive }: { isActive: boolean }) =>
  'block rounded-md px-3 py-2 text-sm font-medium no-underline transition-colors ' +
  (isActive ? 'bg-accent-700 text-white hover:text-white' : 'text-ink hover:bg-accent-50 hover:text-accent-800');

export function MainNav({ onNavigate, className = '' }: { onNavigate?: () => void; className?: string }) {
  const ability = useAppAbility();
  const areas = allowedAreas(ability);
  return (
    <nav aria-label="Main" className={className}>
      <ul className="flex flex-col gap-1 md:flex-row md:items-center">
        <li>
          <NavLink to="/" end className={linkClass} onClick={onNavigate}>
            Home
          </NavLink>
        </li>
        {areas.map((a) => (
          <li key={a.to}>
            <NavLink to={a.to} className={linkClass} onClick={onNavigate}>
              {a.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
