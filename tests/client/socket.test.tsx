import { act, render, screen } from '@testing-library/react';
import { useState } from 'react';
import { describe, expect, it, vi } from 'vitest';
import { SocketProvider, useSocketEvent } from '@/lib/socket';
import { currentSocket } from './support/fake-socket';

function AlertCounter() {
  const [count, setCount] = useState(0);
  useSocketEvent<[{ added: number }]>('alerts:new', ({ added }) => setCount((c) => c + added));
  return <p>{count} new</p>;
}

describe('useSocketEvent', () => {
  it('delivers server events while mounted and unsubscribes on unmount', () => {
    const { rerender } = render(
      <SocketProvider onSessionEnded={() => {}}>
        <AlertCounter />
      </SocketProvider>,
    );
    const socket = currentSocket();
    act(() => socket.serverEmit('alerts:new', { added: 2 }));
    act(() => socket.serverEmit('alerts:new', { added: 3 }));
    expect(screen.getByText('5 new')).toBeInTheDocument();

    rerender(<SocketProvider onSessionEnded={() => {}}>{null}</SocketProvider>);
    expect(socket.count('alerts:new')).toBe(0);
  });

  it('calls onSessionEnded and disconnects when the server ends the session', () => {
    const onSessionEnded = vi.fn();
    const { unmount } = render(
      <SocketProvider onSessionEnded={onSessionEnded}>
        <p>x</p>
      </SocketProvider>,
    );
    const socket = currentSocket();
    act(() => socket.serverEmit('session:ended'));
    expect(onSessionEnded).toHaveBeenCalledOnce();
    expect(socket.disconnectCalls).toBe(1);
    unmount();
    expect(socket.count('session:ended')).toBe(0);
  });
});
