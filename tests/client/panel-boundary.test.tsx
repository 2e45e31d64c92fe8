import { render, screen } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { PanelBoundary } from '@/components/ui/panel-boundary';

let shouldThrow = true;
function Flaky() {
  if (shouldThrow) throw new Error('chart data was malformed');
  return <p>Chart drawn</p>;
}

describe('PanelBoundary', () => {
  it('contains a failing panel, keeps its neighbours, and can try again', async () => {
    vi.spyOn(console, 'error').mockImplementation(() => {});
    shouldThrow = true;
    const onReset = vi.fn();
    render(
      <main>
        <PanelBoundary title="Score history" onReset={onReset}>
          <Flaky />
        </PanelBoundary>
        <p>Case details</p>
      </main>,
    );
    const alert = screen.getByRole('alert');
    expect(alert).toHaveTextContent('Score history could not be shown.');
    expect(alert).toHaveTextContent('chart data was malformed');
    expect(screen.getByText('Case details')).toBeInTheDocument();

    shouldThrow = false;
    await userEvent.click(screen.getByRole('button', { name: 'Try again' }));
    expect(onReset).toHaveBeenCalledOnce();
    expect(screen.getByText('Chart drawn')).toBeInTheDocument();
    expect(screen.queryByRole('alert')).not.toBeInTheDocument();
  });
});
