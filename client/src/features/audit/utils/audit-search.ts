/** The filters a URL can hold (so a filtered view can be bookmarked and shared). */
export const AUDIT_FILTER_KEYS = ['actorId', 'action', 'targetType', 'targetId', 'outcome', 'from', 'to', 'page'] as const;

export type AuditFilters = Partial<Record<(typeof AUDIT_FILTER_KEYS)[number], string>>;

export function filtersFromSearch(params: URLSearchParams): AuditFilters {
  const out: AuditFilters = {};
  for (const k of AUDIT_FILTER_KEYS) {
    const v = params.get(k);
    if (v) out[k] = v;
  }
  return out;
}

/** Query string for the API: only the filters given; `page` left out for the export. */
export function auditSearch(f: AuditFilters, { withPage = true } = {}): string {
  const p = new URLSearchParams();
  for (const k of AUDIT_FILTER_KEYS) {
    const v = f[k];
    if (v && (withPage || k !== 'page')) p.set(k, v);
  }
  return p.toString();
}

