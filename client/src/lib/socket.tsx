import { createContext, useContext, useEffect, useLayoutEffect, useRef, useState, type ReactNode } from 'react';
import { io, type Socket } from 'socket.io-client';
import { SESSION_ENDED_EVENT } from '@shared/api/realtime';

/**
 * connecting: first attempt after sign-in; connected: live events flow;
 * reconnecting: lost, trying again on its own; offline: not trying (browser
 * offline, or the server closed the socket).
 */
export type SocketStatus = 'connecting' | 'connected' | 'reconnecting' | 'offline';

type SocketContextValue = { socket: Socket | null; status: SocketStatus };

const SocketContext = createContext<SocketContextValue>({ socket: null, status: 'offline' });


function connect(): Socket {
  return io({ withCredentials: true });
}

/**
 * One socket per signed-in session. Mount it only inside the signed-in part
 * of the app: the server refuses sockets without a session anyway.
 */
export function SocketProvider({ children, onSessionEnded }: { children: ReactNode; onSessionEnded: () => void }) {
  const [socket, setSocket] = useState<Socket | null>(null);
  const [status, setStatus] = useState<SocketStatus>('connecting');
  const onSessionEndedRef = useRef(onSessionEnded);
  useLayoutEffect(() => {
    onSessionEndedRef.current = onSessionEnded;
  });

  useEffect(() => {
    const s = connect();
    setSocket(s);
    setStatus(s.connected ? 'connected' : 'connecting');

    // `active` is false once the socket has given up (server-side disconnect, refused handshake).
    const lost = () => setStatus(s.active && navigator.onLine !== false ? 'reconnecting' : 'offline');
    const onConnect = () => setStatus('connected');
    const onSessionEndedEvent = () => {
      setStatus('offline');
      s.disconnect();
      onSessionEndedRef.current();
    };
    const onBrowserOffline = () => setStatus('offline');
    const onBrowserOnline = () => {
      if (!s.connected) {
        setStatus('reconnecting');
        if (!s.active) s.connect();
      }
    };

    s.on('connect', onConnect);
    s.on('disconnect', lost);
    s.on('connect_error', lost);
    s.on(SESSION_ENDED_EVENT, onSessionEndedEvent);
    s.io.on('reconnect_failed', onBrowserOffline);
    window.addEventListener('offline', onBrowserOffline);
    window.addEventListener('online', onBrowserOnline);

    return () => {
      window.removeEventListener('offline', onBrowserOffline);
      window.removeEventListener('online', onBrowserOnline);
      s.io.off('reconnect_failed', onBrowserOffline);
      s.off('connect', onConnect);
      s.off('disconnect', lost);
      s.off('connect_error', lost);
      s.off(SESSION_ENDED_EVENT, onSessionEndedEvent);
      s.disconnect();
    };
  }, []);

  return <SocketContext.Provider value={{ socket, status }}>{children}</SocketContext.Provider>;
}

export function useSocket(): SocketContextValue {
  return useContext(SocketContext);
}

/**
 * Subscribes `handler` to a server event for as long as the component is
 * mounted. The handler may change on every render without resubscribing.
 */
export function useSocketEvent<Args extends unknown[]>(name: string, handler: (...args: Args) => void): void {
  const { socket } = useSocket();
  const handlerRef = useRef(handler);
  useLayoutEffect(() => {
    handlerRef.current = handler;
  });
  useEffect(() => {
    if (!socket) return;
    const listener = (...args: unknown[]) => handlerRef.current(...(args as Args));
    socket.on(name, listener);
    return () => {
      socket.off(name, listener);
    };
  }, [socket, name]);
}
