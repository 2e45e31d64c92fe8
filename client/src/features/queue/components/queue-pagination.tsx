import { Button } from '@/components/ui/button';

const PAGE_SIZES = [25, 50, 100, 200];

/** "51–100 of 312", previous / next, rows per page. */
export function QueuePagination({
  page,
  pageSize,
  total,
  shown,
  onPage,
  onPageSize,
}: {
  page: number;
  pageSize: number;
  total: number;
  /** Rows on screen now (held arrivals are not yet). */
  shown: number;
  onPage: (page: number) => void;
  onPageSize: (size: number) => void;
}) {
  const pageCount = Math.max(1, Math.ceil(total / pageSize));
  const first = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = total === 0 ? 0 : first + shown - 1;
  return (
    <nav aria-label="Pages" className="flex flex-wrap items-center gap-3 text-xs text-muted">
      <span className="tabular-nums">
        {first}–{last} of {total.toLocaleString('en')}
      </span>
      <span className="inline-flex items-center gap-1">
        <Button size="sm" onClick={() => onPage(page - 1)} disabled={page <= 1}>
          Previous page
        </Button>
        <span className="px-1 tabular-nums">
          Page {page} of {pageCount}
        </span>
        <Button size="sm" onClick={() => onPage(page + 1)} disabled={page >= pageCount}>
          Next page
        </Button>
      </span>
      <label className="inline-flex items-center gap-1">
        Rows per page
        <select
          value={pageSize}
          onChange={(event) => onPageSize(Number(event.target.value))}
          className="h-7 rounded border border-control bg-surface px-1 text-xs text-text"
        >
          {PAGE_SIZES.map((size) => (
            <option key={size} value={size}>
              {size}
            </option>
          ))}
        </select>
      </label>
    </nav>
  );
}
