import { useCallback, useEffect, useRef, type ReactNode } from 'react';
import { useBlocker } from 'react-router';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';

/**
 * Keeps unsaved edits from being lost: an in-app navigation (another revision, another page)
 * asks first; closing or reloading the tab gets the browser's own prompt (beforeunload).
 * `allowNext()` lets the workspace's own navigation through (after a save or a submit).
 */
export function useUnsavedChangesGuard(dirty: boolean): { allowNext: () => void; prompt: ReactNode } {
  const dirtyRef = useRef(dirty);
  const skipRef = useRef(false);
  useEffect(() => {
    dirtyRef.current = dirty;
  }, [dirty]);

  const blocker = useBlocker(({ currentLocation, nextLocation }) => {
    if (skipRef.current) {
      skipRef.current = false;
      return false;
    }
    return dirtyRef.current && (currentLocation.pathname !== nextLocation.pathname || currentLocation.search !== nextLocation.search);
  });

  useEffect(() => {
    if (!dirty) return;
    const onBeforeUnload = (event: BeforeUnloadEvent) => {
      event.preventDefault();
      // Older browsers show the prompt only when returnValue is set.
      event.returnValue = '';
    };
    window.addEventListener('beforeunload', onBeforeUnload);
    return () => window.removeEventListener('beforeunload', onBeforeUnload);
  }, [dirty]);

  const allowNext = useCallback(() => {
    skipRef.current = true;
    // Only the navigation that follows at once is let through.
    setTimeout(() => {
      skipRef.current = false;
    }, 0);
  }, []);

  const blocked = blocker.state === 'blocked';
  const prompt = (
    <Dialog
      open={blocked}
      onClose={() => blocker.reset?.()}
      title="Leave without saving?"
      description="This draft has changes that are not saved. Leaving this page drops them."
      footer={
        <>
          <Button variant="ghost" data-autofocus onClick={() => blocker.reset?.()}>
            Stay and keep editing
          </Button>
          <Button variant="secondary" onClick={() => blocker.proceed?.()}>
            Leave without saving
          </Button>
        </>
      }
    />
  );
  return { allowNext, prompt };
}
