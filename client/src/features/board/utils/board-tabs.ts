/** The board's sections, in the order of their number keys. */
export const BOARD_TABS = [
  { id: 'team', label: 'Team', key: '1' },
  { id: 'threshold', label: 'Alert threshold', key: '2' },
  { id: 'policy', label: 'SLA and approvals', key: '3' },
  { id: 'routing', label: 'Routing', key: '4' },
] as const;
export type BoardTab = (typeof BOARD_TABS)[number]['id'];

export function boardTabOf(raw: string | null): BoardTab {
  return BOARD_TABS.find((t) => t.id === raw)?.id ?? 'team';
}
