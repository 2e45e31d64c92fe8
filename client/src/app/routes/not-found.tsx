import { NoticePage } from '@/components/ui/notice-page';

export function NotFoundRoute() {
  return (
    <NoticePage title="Page not found">
      There is no screen at this address. It may have moved, or the link may be mistyped.
    </NoticePage>
  );
}
