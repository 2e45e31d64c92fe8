import { useEffect, useMemo, useState } from 'react';
import {
  CHANNELS,
  ROUTING_STRATEGIES,
  ROUTING_STRATEGY_LABELS,
  routingRuleInputSchema,
  type InvestigatorGroup,
  type RoutingResponse,
  type RoutingRule,
  type RoutingRuleInput,
  type RoutingStrategy,
} from '@shared/api/supervision';
import { Button } from '@/components/ui/button';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { useDeleteGroup } from '../api/delete-group';
import { useRouting } from '../api/get-routing';
import { useRoutingPreview } from '../api/preview-routing';
import { useSaveGroup } from '../api/save-group';
import { useSaveRoutingRules } from '../api/save-routing-rules';

const CHANNEL_WORDS: Record<(typeof CHANNELS)[number], string> = { pos: 'In store', ecommerce: 'Online', atm: 'ATM', moto: 'Mail / phone', contactless: 'Contactless' };

type DraftRule = { key: number; name: string; minAmount: string; mccs: string; countries: string; channels: string[]; groupId: number | ''; enabled: boolean };

const list = (s: string) =>
  s
    .split(/[\s,;]+/)
    .map((x) => x.trim())
    .filter(Boolean);

let nextKey = 1;
function toDraft(r: RoutingRule): DraftRule {
  return { key: nextKey++, name: r.name, minAmount: r.minAmount === null ? '' : String(r.minAmount), mccs: r.mccs.join(', '), countries: r.countries.join(', '), channels: r.channels, groupId: r.groupId, enabled: r.enabled };
}

/** A draft row as the API wants it, or the first problem with it. */
export function draftToRule(d: DraftRule): { rule: RoutingRuleInput } | { error: string } {
  const parsed = routingRuleInputSchema.safeParse({
    name: d.name,
    minAmount: d.minAmount.trim() === '' ? null : Number(d.minAmount),
    mccs: list(d.mccs),
    countries: list(d.countries).map((c) => c.toUpperCase()),
    channels: d.channels,
    groupId: d.groupId === '' ? undefined : d.groupId,
    enabled: d.enabled,
  });
  if (!parsed.success) {
    const i = parsed.error.issues[0];
    return { error: `${i.path[0] === 'groupId' ? 'Choose a group' : i.message}${i.path.length && i.path[0] !== 'groupId' ? ` (${String(i.path[0])})` : ''}` };
  }
  return { rule: parsed.data };
}

function GroupEditor({ group, people, onDone }: { group: InvestigatorGroup | null; people: RoutingResponse['people']; onDone?: () => void }) {
  const [name, setName] = useState(group?.name ?? '');
  const [strategy, setStrategy] = useState<RoutingStrategy>(group?.strategy ?? 'least_loaded');
  const [members, setMembers] = useState<Set<number>>(new Set(group?.members.map((m) => m.id) ?? []));
  const save = useSaveGroup();
  const remove = useDeleteGroup();
  const heading = group ? group.name : 'New group';
  return (
    <form
      aria-label={heading}
      className="flex flex-col gap-2 rounded border border-border p-2"
      onSubmit={(e) => {
        e.preventDefault();
        save.mutate({ id: group?.id ?? null, name: name.trim(), strategy, memberIds: [...members] }, { onSuccess: () => onDone?.() });
      }}
    >
      <div className="flex flex-wrap items-end gap-2">
        <TextField className="w-48" label="Group name" value={name} onChange={(e) => setName(e.target.value)} required minLength={2} maxLength={60} />
        <label className="flex flex-col gap-1 text-sm font-medium">
          Hands out cases
          <select className="h-9 rounded border border-control bg-surface px-2 font-normal" value={strategy} onChange={(e) => setStrategy(e.target.value as RoutingStrategy)}>
            {ROUTING_STRATEGIES.map((s) => (
              <option key={s} value={s}>
                {ROUTING_STRATEGY_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
      </div>
      <fieldset className="flex flex-wrap gap-x-4 gap-y-1">
        <legend className="text-xs text-muted">Members</legend>
        {people.map((p) => (
          <label key={p.id} className="flex items-center gap-1.5 text-sm">
            <input
              type="checkbox"
              checked={members.has(p.id)}
              onChange={(e) => {
                const next = new Set(members);
                if (e.target.checked) next.add(p.id);
                else next.delete(p.id);
                setMembers(next);
              }}
            />
            {p.displayName}
          </label>
        ))}
        {group?.members
          .filter((m) => !m.active)
          .map((m) => (
            <span key={m.id} className="text-xs text-muted">
              {m.displayName} (inactive, skipped)
            </span>
          ))}
      </fieldset>
      {(save.isError || remove.isError) && (
        <p role="alert" className="text-xs text-danger">
          {(save.error ?? remove.error)?.message}
        </p>
      )}
      <div className="flex gap-2">
        <Button size="sm" type="submit" variant="primary" disabled={save.isPending || name.trim().length < 2}>
          {group ? 'Save group' : 'Create group'}
        </Button>
        {group && (
          <Button size="sm" variant="ghost" disabled={remove.isPending} onClick={() => remove.mutate(group.id)}>
            Delete group
          </Button>
        )}
      </div>
    </form>
  );
}

function RuleRow({
  d,
  index,
  count,
  groups,
  onChange,
  onMove,
  onRemove,
  problem,
  previewCount,
}: {
  d: DraftRule;
  index: number;
  count: number;
  groups: InvestigatorGroup[];
  onChange: (d: DraftRule) => void;
  onMove: (by: -1 | 1) => void;
  onRemove: () => void;
  problem: string | null;
  previewCount: number | undefined;
}) {
  const set = (patch: Partial<DraftRule>) => onChange({ ...d, ...patch });
  return (
    <li className="flex flex-col gap-2 rounded border border-border p-2" aria-label={`Rule ${index + 1}: ${d.name || 'unnamed'}`}>
      <div className="flex flex-wrap items-end gap-2">
        <span className="pb-2 font-mono text-xs text-muted">{index + 1}.</span>
        <TextField className="w-44" label="Rule name" value={d.name} onChange={(e) => set({ name: e.target.value })} />
        <TextField className="w-36" label="At risk above" type="number" min={0} step={0.01} value={d.minAmount} onChange={(e) => set({ minAmount: e.target.value })} />
        <TextField className="w-40" label="Merchant categories" placeholder="e.g. 5967, 7995" value={d.mccs} onChange={(e) => set({ mccs: e.target.value })} />
        <TextField className="w-32" label="Countries" placeholder="e.g. FR, DE" value={d.countries} onChange={(e) => set({ countries: e.target.value })} />
        <label className="flex flex-col gap-1 text-sm font-medium">
          Send to group
          <select className="h-9 rounded border border-control bg-surface px-2 font-normal" value={d.groupId} onChange={(e) => set({ groupId: e.target.value === '' ? '' : Number(e.target.value) })}>
            <option value="">Choose…</option>
            {groups.map((g) => (
              <option key={g.id} value={g.id}>
                {g.name}
              </option>
            ))}
          </select>
        </label>
      </div>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1">
        <fieldset className="flex flex-wrap gap-x-3">
          <legend className="sr-only">Channels</legend>
          {CHANNELS.map((c) => (
            <label key={c} className="flex items-center gap-1 text-xs">
              <input type="checkbox" checked={d.channels.includes(c)} onChange={(e) => set({ channels: e.target.checked ? [...d.channels, c] : d.channels.filter((x) => x !== c) })} />
              {CHANNEL_WORDS[c]}
            </label>
          ))}
        </fieldset>
        <label className="flex items-center gap-1 text-xs">
          <input type="checkbox" checked={d.enabled} onChange={(e) => set({ enabled: e.target.checked })} />
          In use
        </label>
        <span className="text-xs text-muted" aria-live="polite">
          {problem ? <span className="text-danger">{problem}</span> : previewCount === undefined ? '' : `Would have taken ${previewCount} of yesterday's cases`}
        </span>
        <span className="ml-auto flex gap-1">
          <Button size="sm" variant="ghost" disabled={index === 0} onClick={() => onMove(-1)} aria-label={`Move rule ${index + 1} up`}>
            ↑
          </Button>
          <Button size="sm" variant="ghost" disabled={index === count - 1} onClick={() => onMove(1)} aria-label={`Move rule ${index + 1} down`}>
            ↓
          </Button>
          <Button size="sm" variant="ghost" onClick={onRemove}>
            Remove
          </Button>
        </span>
      </div>
    </li>
  );
}

function RulesEditor({ routing }: { routing: RoutingResponse }) {
  const [drafts, setDrafts] = useState<DraftRule[]>(() => routing.rules.map(toDraft));
  const save = useSaveRoutingRules();
  const checked = useMemo(() => drafts.map(draftToRule), [drafts]);
  const valid = checked.every((c) => 'rule' in c);
  const rules = useMemo(() => checked.flatMap((c) => ('rule' in c ? [c.rule] : [])), [checked]);
  // Preview the draft half a second after the last keystroke, and only while every rule is whole.
  const [previewed, setPreviewed] = useState<RoutingRuleInput[]>(rules);
  useEffect(() => {
    if (!valid) return;
    const t = setTimeout(() => setPreviewed(rules), 500);
    return () => clearTimeout(t);
  }, [rules, valid]);
  const preview = useRoutingPreview(previewed, previewed.length > 0);
  const dirty = JSON.stringify(rules) !== JSON.stringify(routing.rules.map(({ id: _id, position: _p, ...r }) => r)) || !valid;

  const move = (i: number, by: -1 | 1) => {
    const next = [...drafts];
    [next[i], next[i + by]] = [next[i + by], next[i]];
    setDrafts(next);
  };
  return (
    <section aria-labelledby="rules-heading" className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
      <h2 id="rules-heading" className="text-sm font-semibold text-text">
        Routing rules
      </h2>
      <p className="text-xs text-muted">
        When a case opens, the first rule in use that matches it (every condition given must hold: amount at risk above a limit, a merchant category, a
        country, a channel) hands it to a member of its group. No match, or a group with nobody active: the case stays in the shared queue.
      </p>
      {routing.groups.length === 0 && <p className="text-sm text-muted">Create a group first (below): a rule sends cases to a group.</p>}
      <ol className="flex flex-col gap-2">
        {drafts.map((d, i) => (
          <RuleRow
            key={d.key}
            d={d}
            index={i}
            count={drafts.length}
            groups={routing.groups}
            onChange={(nd) => setDrafts(drafts.map((x) => (x.key === d.key ? nd : x)))}
            onMove={(by) => move(i, by)}
            onRemove={() => setDrafts(drafts.filter((x) => x.key !== d.key))}
            problem={'error' in checked[i] ? (checked[i] as { error: string }).error : null}
            previewCount={valid && preview.data && preview.data.perRule.length === drafts.length ? preview.data.perRule[i].count : undefined}
          />
        ))}
      </ol>
      {preview.data && valid && drafts.length > 0 && (
        <p className="text-xs text-muted" aria-live="polite">
          Yesterday ({preview.data.day}, UTC) opened {preview.data.total} cases; {preview.data.unmatched} would have stayed in the shared queue.
        </p>
      )}
      {save.isError && (
        <p role="alert" className="text-xs text-danger">
          {save.error.message}
        </p>
      )}
      <div className="flex gap-2">
        <Button
          size="sm"
          onClick={() => setDrafts([...drafts, { key: nextKey++, name: '', minAmount: '', mccs: '', countries: '', channels: [], groupId: routing.groups[0]?.id ?? '', enabled: true }])}
        >
          Add a rule
        </Button>
        <Button size="sm" variant="primary" disabled={!valid || !dirty || save.isPending} onClick={() => save.mutate(rules)}>
          Save rules
        </Button>
        {save.isSuccess && !dirty && (
          <p role="status" className="self-center text-xs text-ok">
            Saved: new cases follow these rules.
          </p>
        )}
      </div>
    </section>
  );
}

/**
 * Routing: named groups of investigators and the ordered rules that hand new
 * cases to them. Round-robin takes turns in a fixed order; least loaded gives
 * the case to whoever holds the fewest open cases (ties: the oldest account).
 */
export function RoutingPanel() {
  const routing = useRouting();
  const [adding, setAdding] = useState(false);
  if (routing.isPending) return <LoadingLine />;
  if (routing.isError) return <p role="alert" className="text-sm text-danger">Routing could not be loaded: {routing.error.message}</p>;
  const r = routing.data;
  return (
    <div className="flex flex-col gap-4">
      <RulesEditor routing={r} />
      <section aria-labelledby="groups-heading" className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
        <h2 id="groups-heading" className="text-sm font-semibold text-text">
          Investigator groups
        </h2>
        {r.groups.map((g) => (
          <GroupEditor key={`${g.id}:${JSON.stringify(g)}`} group={g} people={r.people} />
        ))}
        {adding ? (
          <GroupEditor group={null} people={r.people} onDone={() => setAdding(false)} />
        ) : (
          <Button size="sm" className="self-start" onClick={() => setAdding(true)}>
            New group
          </Button>
        )}
      </section>
    </div>
  );
}
