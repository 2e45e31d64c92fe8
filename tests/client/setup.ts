import '@testing-library/jest-dom/vitest';
import { cleanup, configure } from '@testing-library/react';
import { afterEach, beforeEach, vi } from 'vitest';
import { setCsrfToken } from '@/lib/api-client';
import { resetFakeSockets } from './support/fake-socket';

// Screens load lazily; on a loaded 2-core machine the default 1 s wait for them is too tight.
configure({ asyncUtilTimeout: 5000 });

// The shell opens a Socket.IO connection; tests drive a fake one instead of the network.
vi.mock('socket.io-client', async () => {
  const fake = await import('./support/fake-socket');
  return { io: fake.fakeIo };
});

// jsdom has no matchMedia; a light-scheme, motion-allowed screen is the default.
if (!window.matchMedia) {
  Object.defineProperty(window, 'matchMedia', {
    configurable: true,
    value: (query: string): MediaQueryList => ({
      matches: false,
      media: query,
      onchange: null,
      addEventListener: () => {},
      removeEventListener: () => {},
      addListener: () => {},
      removeListener: () => {},
      dispatchEvent: () => false,
    }),
  });
}

beforeEach(() => {
  window.localStorage.clear();
  document.documentElement.className = '';
  setCsrfToken(null);
  resetFakeSockets();
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});
