import { createContext, useContext, type ReactNode } from 'react';
import { useServerNow } from '@/lib/time';

const QueueNowContext = createContext<number>(0);

/**
 * The server's "now", ticking, for the age and SLA cells only: the clock
 * re-renders those cells each second, not the whole table.
 */
export function QueueClock({ serverTime, receivedAt, children }: { serverTime: string | undefined; receivedAt: number; children: ReactNode }) {
  const now = useServerNow(serverTime, receivedAt);
  return <QueueNowContext.Provider value={now}>{children}</QueueNowContext.Provider>;
}

export function useQueueNow(): number {
  return useContext(QueueNowContext);
}
