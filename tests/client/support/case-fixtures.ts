import type { CaseDetail, CaseSummary, QueueResponse } from '@shared/api/cases';
import { alertDetail } from './alert-fixture';
import type { StubRequest, StubResponse } from './fetch-stub';

/** Invented cases for the console tests; ids and names mean nothing. */
export const SERVER_TIME = '2031-05-06T10:00:00.000Z';

export function caseSummary(id: number, overrides: Partial<CaseSummary> = {}): CaseSummary {
  return {
    id,
    status: 'new',
    priority: 'high',
    assignee: null,
    team: null,
    card: { bin: '491761', last4: String(1000 + id).slice(-4), status: 'active' },
    probability: 0.874,
    normalizedMargin: 0.42,
    amountAtRisk: { minor: 124_000 + id, currency: 'EUR', exponent: 2 },
    alertCount: 2,
    firstAlertAt: '2031-05-06T09:10:00.000Z',
    lastAlertAt: '2031-05-06T09:50:00.000Z',
    slaDueAt: '2031-05-06T12:00:00.000Z',
    mcc: '5967',
    mccLabel: 'Direct marketing, inbound telemarketing',
    merchantCountry: 'GB',
    channel: 'ecommerce',
    updatedAt: '2031-05-06T09:50:00.000Z',
    version: 1,
    ...overrides,
  };
}

export function queuePage(items: CaseSummary[], overrides: Partial<QueueResponse> = {}): QueueResponse {
  return { items, total: items.length, page: 1, pageSize: 50, serverTime: SERVER_TIME, ...overrides };
}

type FetchMock = { mock: { calls: [RequestInfo | URL, RequestInit | undefined][] } };

function urlOf(input: RequestInfo | URL): URL {
  return new URL(typeof input === 'string' ? input : input instanceof URL ? input.href : input.url, 'http://localhost');
}

/** Query strings of the calls made so far to `path` (the fetch stub records paths only). */
export function queriesTo(path: string): URLSearchParams[] {
  return (fetch as unknown as FetchMock).mock.calls.map(([input]) => urlOf(input)).filter((u) => u.pathname === path).map((u) => u.searchParams);
}

/**
 * A stub handler that also sees the query string. The stub calls handlers
 * synchronously inside fetch, so the latest recorded call is this request.
 */
export function withQuery(handler: (query: URLSearchParams, request: StubRequest) => StubResponse) {
  return (request: StubRequest): StubResponse => {
    const calls = (fetch as unknown as FetchMock).mock.calls;
    return handler(urlOf(calls[calls.length - 1][0]).searchParams, request);
  };
}

/** An invented case file around `caseSummary(id)`. */
export function caseDetail(id: number, overrides: { case?: Partial<CaseDetail['case']> } & Partial<Omit<CaseDetail, 'case'>> = {}): CaseDetail {
  const { case: caseOverrides, ...rest } = overrides;
  return {
    case: {
      ...caseSummary(id, { status: 'claimed', assignee: { id: 1, displayName: 'Ines Marlow' }, version: 3 }),
      disposition: null,
      closedAt: null,
      cardholder: { ref: 'CH-0042', name: 'Rowan Ash', email: 'rowan.ash@example.org' },
      ...caseOverrides,
    },
    recommendedAction: 'review',
    alerts: [alertDetail()],
    activity: [
      {
        transactionId: 3100,
        externalId: 'fh-txn-3100',
        occurredAt: '2031-05-06T09:50:00.000Z',
        amount: { minor: 12_000, currency: 'EUR', exponent: 2 },
        merchantName: 'Kettle & Pine Grocers',
        mcc: '5411',
        country: 'GB',
        channel: 'pos',
        cardPresent: true,
        probability: 0.62,
        distanceKm: 3.2,
        speedKmh: 12,
        inThisCase: true,
        alerted: true,
      },
      {
        transactionId: 3099,
        externalId: 'fh-txn-3099',
        occurredAt: '2031-05-06T08:10:00.000Z',
        amount: { minor: 450, currency: 'EUR', exponent: 2 },
        merchantName: 'Larkspur Rail',
        mcc: '4111',
        country: 'GB',
        channel: 'contactless',
        cardPresent: true,
        probability: 0.02,
        distanceKm: null,
        speedKmh: null,
        inThisCase: false,
        alerted: false,
      },
    ],
    related: [{ id: 88, status: 'new', probability: 0.55, via: ['device'], card: { bin: '535522', last4: '0199' } }],
    notes: [{ id: 1, author: { id: 2, displayName: 'Sam Okafor' }, text: 'Called twice, <b>no answer</b>.', createdAt: '2031-05-06T09:55:00.000Z' }],
    evidence: [],
    messages: [],
    timeline: [{ at: '2031-05-06T09:51:00.000Z', actor: 'Ines Marlow', action: 'case.claim', outcome: 'success', details: null }],
    serverTime: SERVER_TIME,
    ...rest,
  };
}
