import { LogoMark } from './logo';
import { Spinner } from './spinner';

/** First paint while the stored session is checked; nothing else is known yet. */
export function FullPageLoading({ label = 'Opening Earmark…' }: { label?: string }) {
  return (
    <div className="grid min-h-dvh place-items-center bg-paper">
      <div className="flex flex-col items-center gap-4 text-sm text-ink-600">
        <LogoMark className="size-10" />
        <Spinner label={label} />
      </div>
    </div>
  );
}
