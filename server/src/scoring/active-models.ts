import type { Database } from '../db/database';
import { logger } from '../lib/logger';
import { activeModelsFingerprint, loadActiveModels, type LoadedModel } from '../model-registry/model-repository';
import { readAlertingSettings, type AlertingSettings } from '../settings/settings-repository';

/** How often the worker checks for a promoted model or changed settings if no event reached it. */
const REFRESH_MS = 5_000;

/**
 * Keeps the champion and challenger compiled in memory and swaps them when a
 * promotion happens (a `model.changed` event, or the periodic fingerprint
 * check as a fallback): scoring picks up a new champion without a restart.
 */
export class ActiveModels {
  champion: LoadedModel | null = null;
  challenger: LoadedModel | null = null;
  settings: AlertingSettings | null = null;
  private fingerprint = '';
  private checkedAt = 0;

  constructor(private readonly db: Database) {}

  invalidate() {
    this.checkedAt = 0;
  }

  async current() {
    if (Date.now() - this.checkedAt > REFRESH_MS || !this.champion || !this.settings) {
      this.checkedAt = Date.now();
      const fp = await activeModelsFingerprint(this.db);
      if (fp !== this.fingerprint || !this.champion) {
        const m = await loadActiveModels(this.db);
        this.champion = m.champion;
        this.challenger = m.challenger;
        this.fingerprint = fp;
        logger().info({ champion: m.champion?.label, challenger: m.challenger?.label }, 'scoring models loaded');
      }
      this.settings = await readAlertingSettings(this.db);
    }
    return { champion: this.champion, challenger: this.challenger, settings: this.settings! };
  }
}

