import { useState } from 'react';
import { DEMO_FEED_MAX_RATE, DEMO_FEED_MIN_RATE, type DemoFeedState } from '@shared/api/admin';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/text-field';
import { formatDateTime, formatSpan, useNow } from '@/lib/time';
import { useControlDemoFeed } from '../api/control-demo-feed';
import { useDemoFeed } from '../api/get-demo-feed';

/** The feed reports every couple of seconds while it runs; a report older than this means it is not running. */
const STALE_MS = 15_000;

const perSecond = (rate: number) => `${rate.toLocaleString('en', { maximumFractionDigits: 2 })} a second`;

function Totals({ t }: { t: DemoFeedState['totals'] }) {
  const items: [string, number][] = [
    ['sent', t.sent],
    ['accepted', t.accepted],
    ['duplicates', t.duplicates],
    ['rejected', t.rejected],
    ['retried batches', t.retries],
  ];
  return (
    <dl aria-label="Feed totals since it started" className="flex flex-wrap gap-x-6 gap-y-1 text-sm">
      {items.map(([label, n]) => (
        <div key={label} className="flex gap-1.5">
          <dt className="text-muted">{label}</dt>
          <dd className="font-mono tabular-nums">{n.toLocaleString('en')}</dd>
        </div>
      ))}
    </dl>
  );
}

/** What the feed is doing, in one sentence: running or paused at its pace, not reporting, or waiting to pick up a change. */
function Status({ feed, now }: { feed: DemoFeedState; now: number }) {
  const r = feed.reported;
  if (!r)
    return (
      <p>
        The feed has not reported yet. <code className="font-mono">npm start</code> starts it once the web server answers.
      </p>
    );;
  const age = now - Date.parse(r.at);
  const pending =
    (feed.requested.paused !== null && feed.requested.paused !== r.paused) || (feed.requested.rate !== null && !r.paused && feed.requested.rate !== r.rate);
  return (
    <p>
      {r.paused ? (
        <strong>Paused</strong>
      ) : (
        <>
          <strong>Running</strong> at {perSecond(r.rate)}
        </>
      )}
      {age > STALE_MS ? (
        <span className="text-danger">
          {' '}
          as of {formatDateTime(r.at, { seconds: true })}: no report for {formatSpan(age)}, so the feed process is probably not running.
        </span>
      ) : (
        <span className="text-muted"> (reported {formatSpan(age)} ago)</span>
      )}
      {pending && age <= STALE_MS && <span> The change you asked for reaches the feed within a few seconds.</span>}
    </p>
  );
}

/**
 * The local demo's transaction feed (absent outside the demo): its state and
 * totals, pause or resume, and its pace.
 */
export function DemoFeedPanel() {
  const feed = useDemoFeed();
  const control = useControlDemoFeed();
  const now = useNow(1000);
  const [rate, setRate] = useState('');
  if (feed.isPending || feed.data === null) return null;
  if (feed.isError) {
    return (
      <p role="alert" className="text-sm text-danger">
        The demo feed's state could not be loaded: {feed.error.message}
      </p>
    );
  }
  const f = feed.data;
  const paused = f.requested.paused ?? f.reported?.paused ?? false;
  const n = Number(rate);
  const rateError =
    rate.trim() === '' ? undefined : Number.isFinite(n) && n >= DEMO_FEED_MIN_RATE && n <= DEMO_FEED_MAX_RATE ? undefined : `Between ${DEMO_FEED_MIN_RATE} and ${DEMO_FEED_MAX_RATE.toLocaleString('en')}`;
  return (
    <section aria-labelledby="feed-heading" className="flex flex-col gap-2">
      <h2 id="feed-heading" className="text-sm font-semibold text-text">
        Demo transaction feed
      </h2>
      <div className="flex flex-col gap-3 rounded border border-border bg-surface p-3 text-sm">
        <div role="status" aria-label="Feed state">
          <Status feed={f} now={now} />
        </div>
        <Totals t={f.totals} />
        {f.lastError && (
          <p className="text-xs text-muted">
            Last problem{f.lastError.at ? ` (${formatDateTime(f.lastError.at, { seconds: true })})` : ''}: <span className="font-mono">{f.lastError.message}</span>
          </p>
        )}
        <div className="flex flex-wrap items-end gap-3">
          <Button disabled={control.isPending} onClick={() => control.mutate({ paused: !paused })}>
            {paused ? 'Resume the feed' : 'Pause the feed'}
          </Button>
          <form
            aria-label="Feed pace"
            className="flex items-end gap-2"
            onSubmit={(e) => {
              e.preventDefault();
              if (rateError || rate.trim() === '') return;
              control.mutate({ rate: n }, { onSuccess: () => setRate('') });
            }}
          >
            <TextField
              className="w-44"
              label="Transactions a second"
              type="number"
              inputMode="decimal"
              min={DEMO_FEED_MIN_RATE}
              max={DEMO_FEED_MAX_RATE}
              step="any"
              placeholder={f.reported ? String(f.reported.rate) : undefined}
              value={rate}
              error={rateError}
              onChange={(e) => setRate(e.target.value)}
            />
            <Button type="submit" disabled={control.isPending || rate.trim() === '' || rateError !== undefined}>
              Set pace
            </Button>
          </form>
        </div>
        {control.isError && (
          <p role="alert" className="text-xs text-danger">
            {control.error.message}
          </p>
        )}
        <p className="text-xs text-muted">
          Invented traffic of the invented issuer, sent through the real ingest API with the demo key; changes are audited. The seeded history holds a few thousand cardholders,
          who pay well under once a second between them; at a faster pace most of the feed's cards are new, with no history for their velocity features, so the live
          score mix differs from the history the first champion learnt from.
        </p>
      </div>
    </section>
  );
}
