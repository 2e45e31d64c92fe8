import { ROLE_LABELS, type Role } from '@shared/auth/roles';
import { NoticePage } from '@/components/ui/notice-page';

/** Shown in place of a screen the role may not see; the server refuses its data regardless. */
export function ForbiddenRoute({ role }: { role: Role }) {
  return (
    <NoticePage title="This screen is not allowed for your role">
      You are signed in as {ROLE_LABELS[role].toLowerCase()}. If your work needs this screen, ask an admin to review
      your role.
    </NoticePage>
  );
}
