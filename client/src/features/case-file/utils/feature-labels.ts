import { FEATURES } from '@shared/features/definitions';

const BY_NAME = new Map(FEATURES.map((f) => [f.name, f]));

/** The short label of a model feature ("transactions in last hour"), or its name when it is not a known one. */
export function featureLabel(name: string): string {
  return BY_NAME.get(name)?.label ?? name.replace(/_/g, ' ');
}

export function featureUnit(name: string): string {
  return BY_NAME.get(name)?.unit ?? '';
}

export function featureDescription(name: string): string | undefined {
  return BY_NAME.get(name)?.description;
}

/** Features that hold 1 or 0 (yes / no): edited as a choice, not a number. */
export const FLAG_FEATURES = new Set(['mcc_high_risk', 'foreign', 'card_present', 'new_device']);
