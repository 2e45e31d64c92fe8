/**
 * Query keys of the case API, in one place because two features cache it: the
 * Queue lists cases and the Case file shows one, and an action in either must
 * refresh both. Each endpoint's queryOptions builds its key from here; every
 * invalidation goes through those options or these prefixes.
 */
export const caseQueryKeys = {
  all: ['cases'] as const,
  lists: () => ['cases', 'list'] as const,
  list: (query: Record<string, unknown>) => ['cases', 'list', query] as const,
  details: () => ['cases', 'detail'] as const,
  detail: (id: number) => ['cases', 'detail', id] as const,
};
