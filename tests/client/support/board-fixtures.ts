import type { BoardResponse, CaseApproval, SupervisionSettingsResponse, ThresholdCurve } from '@shared/api/supervision';
import { caseSummary, SERVER_TIME } from './case-fixtures';

/** Invented team figures for the Board tests; names and numbers mean nothing. */
export function boardFixture(overrides: Partial<BoardResponse> = {}): BoardResponse {
  return {
    people: [
      { id: 1, displayName: 'Ines Marlow', role: 'investigator', status: 'active', open: 4, claimed: 2, closedToday: 7, medianHandlingMinutes: 18.5, slaBreaches: 1 },
      { id: 5, displayName: 'Teo Vance', role: 'investigator', status: 'active', open: 1, claimed: 1, closedToday: 3, medianHandlingMinutes: null, slaBreaches: 0 },
      { id: 2, displayName: 'Sam Okafor', role: 'supervisor', status: 'active', open: 0, claimed: 0, closedToday: 0, medianHandlingMinutes: null, slaBreaches: 0 },
    ],
    unassigned: { open: 6, slaBreaches: 2 },
    totals: { open: 11, slaBreaches: 3, awaitingApproval: 1 },
    queueAge: [
      { label: '< 15 min', fromMinutes: 0, toMinutes: 15, count: 5, breached: 0 },
      { label: '15–30 min', fromMinutes: 15, toMinutes: 30, count: 3, breached: 1 },
      { label: '> 24 h', fromMinutes: 1440, toMinutes: null, count: 3, breached: 2 },
    ],
    alertVolume: Array.from({ length: 24 }, (_, i) => ({ hour: new Date(Date.parse(SERVER_TIME) - (23 - i) * 3_600_000).toISOString(), alerts: i % 5, casesOpened: i % 3 })),
    capacity: { dailyCases: 48, perHour: 2 },
    dayStart: '2031-05-06T00:00:00.000Z',
    serverTime: SERVER_TIME,
    ...overrides,
  };
}

export function approvalFixture(id: number, proposerId: number, overrides: Partial<CaseApproval> = {}): CaseApproval {
  return {
    id,
    caseId: 700 + id,
    case: caseSummary(700 + id, { status: 'awaiting_approval', amountAtRisk: { minor: 1_250_000, currency: 'EUR', exponent: 2 } }),
    proposedBy: { id: proposerId, displayName: proposerId === 2 ? 'Sam Okafor' : 'Ines Marlow' },
    disposition: 'confirmed_fraud',
    fraudType: 'card_not_present',
    reason: 'Cardholder denies both payments',
    amountConfirmed: null,
    amountRecovered: null,
    status: 'pending',
    createdAt: '2031-05-06T09:30:00.000Z',
    decidedBy: null,
    decidedAt: null,
    note: null,
    ...overrides,
  };
}

export function settingsFixture(overrides: Partial<SupervisionSettingsResponse> = {}): SupervisionSettingsResponse {
  return {
    threshold: 0.5,
    reviewBand: 0.2,
    declineBand: 0.9,
    sla: { slaMinutes: { urgent: 30, high: 120, standard: 480 }, priorityBands: { urgent: 0.9, high: 0.7 } },
    dailyCapacity: 48,
    approvalLimit: 10_000,
    updatedAt: SERVER_TIME,
    ...overrides,
  };
}

/** A curve where cases a day fall by 2 per step: 200 at 1 %, ..., 2 at 99 %; precision rises, recall falls. */
export function curveFixture(overrides: Partial<ThresholdCurve> = {}): ThresholdCurve {
  return {
    points: Array.from({ length: 99 }, (_, i) => {
      const t = (i + 1) / 100;
      return { threshold: t, casesPerDay: 200 - 2 * i, alertsPerDay: 300 - 3 * i, precision: t, recall: 1 - t };
    }),
    current: 0.5,
    traffic: { days: 14, from: '2031-04-22T10:00:00.000Z', to: SERVER_TIME, scored: 123_456 },
    precisionSource: 'holdout_histogram',
    precisionNote: "From the champion's held-out test rows.",
    champion: { id: 3, label: 'v3' },
    ...overrides,
  };
}
