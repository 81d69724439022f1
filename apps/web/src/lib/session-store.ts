import { z } from 'zod';

/**
 * The signed-in session lives in localStorage under one key so that a reload or a second
 * tab stays signed in. Only the tokens are kept: who the user is comes from /api/me, which
 * also tells us on start-up whether the stored tokens still work.
 */
export const SESSION_STORAGE_KEY = 'earmark.session';

const StoredSession = z.object({
  accessToken: z.string().min(1),
  refreshToken: z.string().min(1),
});
export type SessionTokens = z.infer<typeof StoredSession>;

/** Why the last session ended; the sign-in page words its notice from this. */
export type SessionEndReason = 'signed-out' | 'expired';

export type SessionState = {
  tokens: SessionTokens | null;
  endReason: SessionEndReason | null;
};

type Listener = () => void;

function readStorage(): SessionTokens | null {
  try {
    const raw = window.localStorage.getItem(SESSION_STORAGE_KEY);
    if (!raw) return null;
    const parsed = StoredSession.safeParse(JSON.parse(raw));
    return parsed.success ? parsed.data : null;
  } catch {
    // Corrupt JSON or storage disabled (private mode): behave as signed out.
    return null;
  }
}

function createSessionStore() {
  let state: SessionState = { tokens: readStorage(), endReason: null };
  const listeners = new Set<Listener>();

  const emit = (next: SessionState) => {
    state = next;
    for (const listener of listeners) listener();
  };

  // Another tab signing in or out should be reflected here too.
  if (typeof window !== 'undefined') {
    window.addEventListener('storage', (event) => {
      if (event.key !== SESSION_STORAGE_KEY) return;
      const tokens = readStorage();
      emit({ tokens, endReason: tokens ? null : 'signed-out' });
    });
  }

  return {
    /** Stable snapshot for useSyncExternalStore. */
    getState: (): SessionState => state,
    getTokens: (): SessionTokens | null => state.tokens,
    set(tokens: SessionTokens): void {
      try {
        window.localStorage.setItem(SESSION_STORAGE_KEY, JSON.stringify(tokens));
      } catch {
        // Storage full or disabled: the session still works until the tab closes.
      }
      emit({ tokens, endReason: null });
    },
    clear(reason: SessionEndReason): void {
      try {
        window.localStorage.removeItem(SESSION_STORAGE_KEY);
      } catch {
        // Nothing to remove when storage is unavailable.
      }
      if (state.tokens === null && state.endReason === reason) return;
      emit({ tokens: null, endReason: reason });
    },
    /** Re-reads localStorage; tests use it after seeding storage directly. */
    reload(): void {
      emit({ tokens: readStorage(), endReason: null });
    },
    subscribe(listener: Listener): () => void {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
  };
}

export const sessionStore = createSessionStore();
