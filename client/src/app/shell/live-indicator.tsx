import { cn } from '@/lib/cn';
import { useSocket, type SocketStatus } from '@/lib/socket';

const LOOK: Record<SocketStatus, { text: string; dot: string; help: string }> = {
  connected: { text: 'Live', dot: 'bg-ok border-ok', help: 'Live updates are arriving.' },
  connecting: { text: 'Connecting…', dot: 'border-warn bg-transparent', help: 'Opening the live connection.' },
  reconnecting: {
    text: 'Reconnecting…',
    dot: 'border-warn bg-transparent',
    help: 'The live connection dropped; retrying. What you see may be out of date.',
  },
  offline: {
    text: 'Offline',
    dot: 'border-muted bg-transparent border-dashed',
    help: 'No live connection. What you see may be out of date; reload to try again.',
  },
};

/** The live connection's state in words; the dot's fill and outline only echo them. */
export function LiveIndicator() {
  const { status } = useSocket();
  const look = LOOK[status];
  return (
    <span role="status" className="inline-flex items-center gap-1.5 text-xs text-muted" title={look.help}>
      <span aria-hidden="true" className={cn('inline-block h-2.5 w-2.5 rounded-full border-2', look.dot)} />
      <span>{look.text}</span>
    </span>
  );
}
