import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Socket } from 'socket.io-client';
import { BACKFILL_PROGRESS_EVENT, BACKFILL_REQUIRED_COLUMNS } from '../../shared/src/api/backfill';
import { DRIFT_REPORTED_EVENT, MODELS_CHANGED_EVENT, PROMOTION_CHANGED_EVENT, TRAINING_PROGRESS_EVENT } from '../../shared/src/api/models';
import { HELLO_EVENT, QUEUE_ALERT_EVENT, QUEUE_CASE_CHANGED_EVENT, SESSION_ENDED_EVENT, SOCKET_EVENTS } from '../../shared/src/api/realtime';
import type { Role } from '../../shared/src/auth/roles';
import { DEMO_ACCOUNTS } from '../../server/src/demo/demo-accounts';
import { publishEvents, type DomainEvent } from '../../server/src/events/event-bus';
import { connectSocket, startTestServer, type TestServer } from './helpers/test-server';
import { testPan } from './helpers/transactions';
import { newPerson, send, signIn, waitFor, type Person } from './helpers/supervision-kit';

/**
 * Who hears which socket event, written out by hand and checked against the
 * real server: every event in the server's table (SOCKET_EVENTS) must have an
 * entry here, and each is sent the way the product sends it (domain events
 * through the Redis event bus; greetings, session ends and import progress by
 * what causes them) to one socket per role at once. A socket receives an
 * event or not; "not" is proven by a marker sent to every socket after the
 * event (Socket.IO keeps the order of one socket's packets), not by a wait.
 */
type Expectation =
  | { bus: (stamp: string) => DomainEvent; roles: Role[] }
  | { only: 'the connecting socket' | 'the ended session' | 'the uploader' };

const caseFields = { created: true, transactionId: 1, externalId: 'sock-probe', probability: 0.9, status: 'new' };
const EXPECTED: Record<string, Expectation> = {
  [HELLO_EVENT]: { only: 'the connecting socket' },
  [SESSION_ENDED_EVENT]: { only: 'the ended session' },
  // A case in the shared queue (no team): every investigator and supervisor. Team cases: below.
  [QUEUE_ALERT_EVENT]: {
    bus: (at) => ({ type: 'case.alerted', caseId: 990_001, ...caseFields, assigneeId: null, teamId: null, at }),
    roles: ['investigator', 'supervisor'],
  },
  [QUEUE_CASE_CHANGED_EVENT]: {
    bus: (at) => ({ type: 'case.changed', caseId: 990_002, status: 'claimed', assigneeId: null, teamId: null, at }),
    roles: ['investigator', 'supervisor'],
  },
  [MODELS_CHANGED_EVENT]: { bus: (at) => ({ type: 'model.changed', at }), roles: ['data_scientist', 'supervisor'] },
  [TRAINING_PROGRESS_EVENT]: {
    bus: (at) => ({
      type: 'training.progress',
      runId: 990_003,
      status: 'running',
      round: 3,
      totalRounds: 10,
      trainLoss: 0.5,
      validationLoss: 0.6,
      phase: 'boosting',
      points: [],
      modelVersionId: null,
      error: null,
      at,
    }),
    roles: ['data_scientist', 'supervisor'],
  },
  [PROMOTION_CHANGED_EVENT]: { bus: (at) => ({ type: 'promotion.changed', requestId: 990_004, status: 'pending', at }), roles: ['data_scientist', 'supervisor'] },
  [DRIFT_REPORTED_EVENT]: {
    bus: (at) => ({ type: 'drift.reported', reportId: 990_005, modelVersionId: 1, flagged: [], at }),
    roles: ['data_scientist', 'supervisor'],
  },
  [BACKFILL_PROGRESS_EVENT]: { only: 'the uploader' },
};

interface Listener {
  name: string;
  role: Role;
  person: Person;
  socket: Socket;
  got: { event: string; payload: unknown }[];
}

const ts: TestServer = await startTestServer();
const listeners: Listener[] = [];
let teamMember: Person;
let teamId: number;
let sup: Person;
let admin: Person;

async function listen(name: string, role: Role, person: Person): Promise<Listener> {
  const socket = connectSocket(ts.baseUrl, person.cookie);
  const l: Listener = { name, role, person, socket, got: [] };
  // Recorded from the first packet, so the greeting counts too.
  socket.onAny((event: string, payload: unknown) => l.got.push({ event, payload }));
  await new Promise((resolve, reject) => {
    socket.on(HELLO_EVENT, resolve);
    socket.on('connect_error', reject);
  });
  return l;
}

/** Whether the server accepts a socket with this cookie (the socket is closed again either way). */
async function connectOutcome(cookie?: string): Promise<'connected' | 'refused'> {
  const socket = connectSocket(ts.baseUrl, cookie);
  const outcome = await new Promise<'connected' | 'refused'>((resolve) => {
    socket.on('connect', () => resolve('connected'));
    socket.on('connect_error', () => resolve('refused'));
  });
  socket.close();
  return outcome;
}

let markers = 0;
/** Resolves once every listed socket has had everything the server sent it before now. */
async function flush(among: Listener[] = listeners): Promise<void> {
  markers += 1;
  const id = markers;
  const arrived = among.map((l) => waitFor(async () => l.socket.disconnected || l.got.some((g) => g.event === 'test:marker' && g.payload === id), 5_000));
  ts.server.hub.io.emit('test:marker', id);
  await Promise.all(arrived);
}

const received = (l: Listener, event: string, match: (payload: unknown) => boolean) => l.got.some((g) => g.event === event && match(g.payload));
const stampOf = (p: unknown) => (p as { at?: string } | null)?.at;

/** Publishes a domain event on the real bus and answers who heard `event` of it; waits first for `mustReach`. */
async function whoHears(event: string, domainEvent: DomainEvent, mustReach: string[]): Promise<string[]> {
  await publishEvents(ts.server.redis, ts.server.config.REDIS_PREFIX, [domainEvent]);
  const byStamp = (p: unknown) => stampOf(p) === domainEvent.at;
  await waitFor(async () => mustReach.every((n) => received(listeners.find((l) => l.name === n)!, event, byStamp)), 5_000);
  await flush();
  return listeners.filter((l) => received(l, event, byStamp)).map((l) => l.name).sort();
}

let stamps = 0;
const stamp = () => new Date(Date.UTC(2031, 0, 1, 0, 0, 0, (stamps += 1))).toISOString();
const byName = (n: string) => listeners.find((l) => l.name === n)!;

beforeAll(async () => {
  for (const a of DEMO_ACCOUNTS) listeners.push(await listen(a.role, a.role, await signIn(ts, a.email)));
  sup = byName('supervisor').person;
  admin = byName('admin').person;
  // A second investigator, in a team the demo investigator is not in.
  teamMember = await newPerson(ts, 'investigator', 'Team Member');
  const group = await send(sup, 'post', '/api/routing/groups', { name: `Socket team ${Date.now()}`, strategy: 'round_robin', memberIds: [teamMember.id] }).expect(201);
  teamId = group.body.groups.find((g: { members: { id: number }[] }) => g.members.some((m) => m.id === teamMember.id)).id as number;
  listeners.push(await listen('team investigator', 'investigator', teamMember));
});

afterAll(async () => {
  if (teamId) await send(sup, 'delete', `/api/routing/groups/${teamId}`);
  for (const l of listeners) l.socket.close();
  await ts?.close();
});

describe('socket access', () => {
  it('refuses a socket without a session, or with a session cookie the server never issued', async () => {
    for (const cookie of [undefined, 'edgecase.sid=s%3Anot-a-session.forged']) expect(await connectOutcome(cookie), `cookie ${cookie ?? 'none'}`).toBe('refused');
    // The same server takes a signed-in one (the refusal above is not of every socket).
    expect(await connectOutcome(byName('admin').person.cookie)).toBe('connected');
  });

  it('has an expectation for every event in the server’s table, and none for an event it does not send', () => {
    expect(Object.keys(EXPECTED).sort()).toEqual(Object.keys(SOCKET_EVENTS).sort());
  });

  it.each(Object.keys(SOCKET_EVENTS))('%s reaches exactly whom the table says', async (event) => {
    const want = EXPECTED[event];
    expect(want, `${event} is sent but has no expectation here`).toBeDefined();
    if ('bus' in want) {
      const roles = new Set(want.roles);
      const expected = listeners.filter((l) => roles.has(l.role)).map((l) => l.name).sort();
      expect(expected.length).toBeGreaterThan(0);
      expect(await whoHears(event, want.bus(stamp()), expected)).toEqual(expected);
      return;
    }
    if (want.only === 'the connecting socket') {
      // Everyone was greeted once, with their own id and role; a new socket's greeting goes to it alone.
      for (const l of listeners) {
        const hellos = l.got.filter((g) => g.event === HELLO_EVENT).map((g) => g.payload as { user: { id: number; role: Role } });
        expect(hellos.map((h) => h.user), l.name).toEqual([{ id: l.person.id, role: l.role }]);
      }
      const late = await listen('late scientist', 'data_scientist', await signIn(ts, DEMO_ACCOUNTS.find((a) => a.role === 'data_scientist')!.email));
      await flush();
      for (const l of listeners) expect(l.got.filter((g) => g.event === HELLO_EVENT), l.name).toHaveLength(1);
      expect(late.got.filter((g) => g.event === HELLO_EVENT)).toHaveLength(1);
      late.socket.close();
      return;
    }
    if (want.only === 'the ended session') {
      // An admin deactivates a person: their socket is told why and closed; nobody else hears it.
      const leaving = await newPerson(ts, 'investigator', 'Leaving Investigator');
      const l = await listen('leaving investigator', 'investigator', leaving);
      const closed = new Promise<void>((resolve) => l.socket.on('disconnect', () => resolve()));
      await send(admin, 'post', `/api/admin/users/${leaving.id}/deactivate`).expect(200);
      await closed;
      expect(l.got.filter((g) => g.event === SESSION_ENDED_EVENT).map((g) => g.payload)).toEqual([{ reason: 'deactivated' }]);
      await flush();
      for (const other of listeners) expect(other.got.some((g) => g.event === SESSION_ENDED_EVENT), other.name).toBe(false);
      // Its cookie opens no new socket.
      expect(await connectOutcome(leaving.cookie)).toBe('refused');
      return;
    }
    // Import progress: to the person who uploaded, on every socket of theirs, and to nobody else.
    const scientist = byName('data_scientist');
    const header = BACKFILL_REQUIRED_COLUMNS.join(',');
    const values: Record<string, string> = {
      id: `sock-bf-${Date.now().toString(36)}`,
      occurredAt: '2026-03-02T10:00:00Z',
      amount: '25.00',
      currency: 'USD',
      'card.number': testPan(91_001),
      'card.cardholderId': 'ch-sock',
      'merchant.id': 'm-sock',
      'merchant.name': 'Socket Test Merchant',
      'merchant.mcc': '5411',
      'merchant.country': 'US',
      cardPresent: 'true',
    };
    const csv = `${header}\n${BACKFILL_REQUIRED_COLUMNS.map((c) => values[c]).join(',')}\n`;
    const res = await scientist.person.agent
      .post('/api/backfill/transactions')
      .set('X-CSRF-Token', scientist.person.csrf)
      .attach('file', Buffer.from(csv), { filename: 'sockets.csv', contentType: 'text/csv' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const ofThisRun = (p: unknown) => (p as { id?: number }).id === res.body.import.id;
    await waitFor(async () => received(scientist, BACKFILL_PROGRESS_EVENT, ofThisRun), 5_000);
    await flush();
    expect(listeners.filter((l) => received(l, BACKFILL_PROGRESS_EVENT, ofThisRun)).map((l) => l.name)).toEqual(['data_scientist']);
  });
});

describe('case events and teams', () => {
  const alert = (o: { teamId: number | null; assigneeId: number | null }): DomainEvent => ({ type: 'case.alerted', caseId: 990_010, ...caseFields, ...o, at: stamp() });

  it('a team’s case reaches supervisors and that team, not an investigator outside it', async () => {
    const heard = await whoHears(QUEUE_ALERT_EVENT, alert({ teamId, assigneeId: null }), ['supervisor', 'team investigator']);
    expect(heard).toEqual(['supervisor', 'team investigator']);
  });

  it('a team’s case handed to someone outside the team reaches them too, and the previous holder hears it left', async () => {
    const outsider = byName('investigator').person.id;
    expect(await whoHears(QUEUE_ALERT_EVENT, alert({ teamId, assigneeId: outsider }), ['supervisor', 'team investigator', 'investigator'])).toEqual([
      'investigator',
      'supervisor',
      'team investigator',
    ]);
    const back: DomainEvent = { type: 'case.changed', caseId: 990_011, status: 'new', assigneeId: null, previousAssigneeId: outsider, teamId, at: stamp() };
    expect(await whoHears(QUEUE_CASE_CHANGED_EVENT, back, ['supervisor'])).toEqual(['investigator', 'supervisor', 'team investigator']);
  });

  it('an event that names no team reaches no team room: only supervisors and the holder', async () => {
    const legacy = { type: 'case.alerted', caseId: 990_012, ...caseFields, assigneeId: null, at: stamp() } as unknown as DomainEvent;
    expect(await whoHears(QUEUE_ALERT_EVENT, legacy, ['supervisor'])).toEqual(['supervisor']);
  });

  it('follows team membership live: joining a team brings its case events, leaving ends them', async () => {
    const outsider = byName('investigator');
    const groupBody = (memberIds: number[]) => ({ name: `Socket team moved ${teamId}`, strategy: 'round_robin', memberIds });
    const inRoom = async (l: Listener) => (await ts.server.hub.io.in(`team:${teamId}`).fetchSockets()).some((s) => s.id === l.socket.id);

    await send(sup, 'put', `/api/routing/groups/${teamId}`, groupBody([teamMember.id, outsider.person.id])).expect(200);
    await waitFor(() => inRoom(outsider), 5_000);
    expect(await whoHears(QUEUE_ALERT_EVENT, alert({ teamId, assigneeId: null }), ['supervisor', 'investigator'])).toEqual([
      'investigator',
      'supervisor',
      'team investigator',
    ]);

    await send(sup, 'put', `/api/routing/groups/${teamId}`, groupBody([teamMember.id])).expect(200);
    await waitFor(async () => !(await inRoom(outsider)), 5_000);
    expect(await whoHears(QUEUE_ALERT_EVENT, alert({ teamId, assigneeId: null }), ['supervisor'])).toEqual(['supervisor', 'team investigator']);
  });
});

describe('session ends across web servers', () => {
  /** A socket on `server` for this session cookie, with what it heard. */
  async function socketOn(server: TestServer, cookie: string) {
    const socket = connectSocket(server.baseUrl, cookie);
    const ended: unknown[] = [];
    socket.on(SESSION_ENDED_EVENT, (e: unknown) => ended.push(e));
    await new Promise((resolve, reject) => {
      socket.on(HELLO_EVENT, resolve);
      socket.on('connect_error', reject);
    });
    return { socket, ended, closed: () => waitFor(async () => socket.disconnected, 5_000) };
  }

  it('ends the sockets another web server holds for a deactivated person or a signed-out session, and no other session', async () => {
    // A second web server on the same database and event bus, as behind a load balancer.
    const other = await startTestServer({ REDIS_PREFIX: ts.server.config.REDIS_PREFIX });
    const opened: Socket[] = [];
    try {
      const leaving = await newPerson(ts, 'investigator', 'Leaving Elsewhere');
      const far = await socketOn(other, leaving.cookie);
      opened.push(far.socket);
      await send(admin, 'post', `/api/admin/users/${leaving.id}/deactivate`).expect(200);
      await far.closed();
      expect(far.ended).toEqual([{ reason: 'deactivated' }]);

      const person = await newPerson(ts, 'investigator', 'Two Sessions');
      const secondSession = await signIn(ts, person.email);
      const signingOut = await socketOn(other, person.cookie);
      const staying = await socketOn(other, secondSession.cookie);
      opened.push(signingOut.socket, staying.socket);
      await send(person, 'post', '/api/auth/logout').expect(204);
      await signingOut.closed();
      expect(signingOut.ended).toEqual([{ reason: 'signed_out' }]);
      // The person's other session keeps its socket: a marker sent after the sign-out still reaches it.
      const marker = new Promise((resolve) => staying.socket.on('test:marker', resolve));
      other.server.hub.io.emit('test:marker', 1);
      await marker;
      expect(staying.socket.connected).toBe(true);
      expect(staying.ended).toEqual([]);
    } finally {
      for (const s of opened) s.close();
      await other.close();
    }
  });
});
