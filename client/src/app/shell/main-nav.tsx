import { NavLink, useNavigate } from 'react-router';
import type { Role } from '@shared/auth/roles';
import { KeyHint } from '@/components/ui/key-hint';
import { cn } from '@/lib/cn';
import { useHotkey } from '@/lib/hotkeys';
import { screensFor, type Screen } from '../screens';

function GoToHotkey({ screen }: { screen: Screen }) {
  const navigate = useNavigate();
  useHotkey(screen.hotkey, () => navigate(screen.path), { description: `Go to ${screen.label}`, group: 'Go to' });
  return null;
}

/** Only the screens this role may open; the go-to keys follow the same list. */
export function MainNav({ role }: { role: Role }) {
  const screens = screensFor(role);
  return (
    <nav aria-label="Screens">
      <ul className="flex items-center gap-1">
        {screens.map((screen) => (
          <li key={screen.path}>
            <GoToHotkey screen={screen} />
            <NavLink
              to={screen.path}
              className={({ isActive }) =>
                cn(
                  'inline-flex h-8 items-center gap-2 rounded px-2 text-sm',
                  isActive ? 'bg-raised font-semibold text-text' : 'text-muted hover:bg-raised hover:text-text',
                )
              }
            >
              {screen.label}
              <KeyHint keys={screen.hotkey} />
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
