import { useEffect, useState } from 'react';

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

/**
 * A span of time, compact and stable in width: "45 s", "12 min", "3 h 05 min",
 * "2 d 4 h". Always positive; callers say whether it is ahead or past.
 */
export function formatSpan(ms: number): string {
  const abs = Math.abs(ms);
  if (abs < MINUTE) return `${Math.floor(abs / 1000)} s`;
  if (abs < HOUR) return `${Math.floor(abs / MINUTE)} min`;
  if (abs < DAY) {
    const hours = Math.floor(abs / HOUR);
    const minutes = Math.floor((abs % HOUR) / MINUTE);
    return `${hours} h ${String(minutes).padStart(2, '0')} min`;
  }
  const days = Math.floor(abs / DAY);
  const hours = Math.floor((abs % DAY) / HOUR);
  return hours === 0 ? `${days} d` : `${days} d ${hours} h`;
}

const dateTime = new Intl.DateTimeFormat('en-GB', {
  day: 'numeric',
  month: 'short',
  hour: '2-digit',
  minute: '2-digit',
  hourCycle: 'h23',
});
const dateTimeSeconds = new Intl.DateTimeFormat('en-GB', {
  day: 'numeric',
  month: 'short',
  hour: '2-digit',
  minute: '2-digit',
  second: '2-digit',
  hourCycle: 'h23',
});

/** "14 Mar, 09:42" in the reader's time zone; the exact UTC instant goes in a title or datetime attribute. */
export function formatDateTime(iso: string, { seconds = false }: { seconds?: boolean } = {}): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return '–';
  return (seconds ? dateTimeSeconds : dateTime).format(date);
}

/** The current time, refreshed every `intervalMs`, for countdowns. */
export function useNow(intervalMs = 1000): number {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const timer = setInterval(() => setNow(Date.now()), intervalMs);
    return () => clearInterval(timer);
  }, [intervalMs]);
  return now;
}

/**
 * "Now" on the server's clock: the browser's clock shifted by how far it was
 * from `serverTime` when that answer arrived (`receivedAt`, the query's
 * dataUpdatedAt). SLA countdowns then agree across desks whose clocks drift.
 */
export function useServerNow(serverTime: string | undefined, receivedAt: number, intervalMs = 1000): number {
  const now = useNow(intervalMs);
  const server = serverTime ? Date.parse(serverTime) : NaN;
  const offset = Number.isFinite(server) && receivedAt > 0 ? server - receivedAt : 0;
  return now + offset;
}
