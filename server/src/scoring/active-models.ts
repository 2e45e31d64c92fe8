import type { Database } from '../db/database';
import { logger } from '../lib/logger';
import { activeModelsFingerprint, loadActiveModels, type LoadedModel } from '../model-registry/model-repository';
import { readAlertingSettings, type AlertingSettings } from '../settings/settings-repository';

/** How often the models and settings are checked in the background if no event reached this process. */
const REFRESH_MS = 5_000;

/**
 * Keeps the champion and challenger compiled in memory and swaps them when a
 * promotion happens (a `model.changed` event, or the periodic fingerprint
 * check as a fallback): scoring picks up a new champion without a restart.
 *
 * The periodic check runs in the background, and `start()` loads at boot, so a
 * synchronous decision never waits on a model load or a fingerprint query; only
 * after an event (`invalidate()`) does `current()` wait for the load that
 * follows it, so a promotion or a settings change applies to the next request.
 */
export class ActiveModels {
  champion: LoadedModel | null = null;
  challenger: LoadedModel | null = null;
  settings: AlertingSettings | null = null;
  private fingerprint = '';
  /** Loads asked for (events, the timer, the first use), the ones current() must wait for (events), and the last one finished. */
  private asked = 1;
  private required = 1;
  private done = 0;
  private running: Promise<void> | null = null;
  private timer: NodeJS.Timeout | null = null;

  constructor(
    private readonly db: Database,
    private readonly refreshMs = REFRESH_MS,
  ) {}

  /** Loads now and then checks every few seconds in the background (until close()). */
  start(): this {
    this.kick().catch((err: Error) => logger().warn({ err: err.message }, 'scoring models not loaded yet'));
    this.timer ??= setInterval(() => {
      this.asked += 1;
      this.kick().catch((err: Error) => logger().warn({ err: err.message }, 'scoring models not refreshed'));
    }, this.refreshMs);
    this.timer.unref();
    return this;
  }

  /** Something changed (an event): load again, and make the next current() wait for that load. */
  invalidate(): void {
    this.asked += 1;
    this.required = this.asked;
    this.kick().catch(() => undefined);
  }

  async current() {
    // No champion yet (first start, before the first training run): look again on every use
    // (callers that arrive while a load runs share it).
    if (!this.champion && !this.running) this.required = ++this.asked;
    if (this.done < this.required) await this.kick();
    return { champion: this.champion, challenger: this.challenger, settings: this.settings! };
  }

  close(): void {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
  }

  /** Runs loads until the last one asked for has finished; concurrent callers share it. */
  private kick(): Promise<void> {
    this.running ??= (async () => {
      try {
        while (this.done < this.asked) {
          const generation = this.asked;
          await this.load();
          this.done = generation;
        }
      } finally {
        this.running = null;
      }
    })();
    return this.running;
  }

  private async load(): Promise<void> {
    const fp = await activeModelsFingerprint(this.db);
    if (fp !== this.fingerprint || !this.champion) {
      const m = await loadActiveModels(this.db);
      this.champion = m.champion;
      this.challenger = m.challenger;
      this.fingerprint = fp;
      if (m.champion || m.challenger) logger().info({ champion: m.champion?.label, challenger: m.challenger?.label }, 'scoring models loaded');
    }
    this.settings = await readAlertingSettings(this.db);
  }
}
