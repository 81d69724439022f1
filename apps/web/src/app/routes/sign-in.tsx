import { redirect, useNavigate, useSearchParams } from 'react-router';
import { Wordmark } from '@/components/logo';
import { SignInForm } from '@/features/auth/components/sign-in-form';
import { paths, safeNextPath } from '@/lib/paths';
import { sessionStore } from '@/lib/session-store';

export function signInLoader() {
  // Already signed in: the app shell validates the session against /api/me.
  if (sessionStore.getTokens()) throw redirect(paths.projects());
  return null;
}

/** A drawn tolerance mask with a measured response inside it; one point brushes the limit. */
function MaskIllustration() {
  return (
    <svg viewBox="0 0 420 236" aria-hidden="true" className="w-full max-w-[460px]">
      <defs>
        <linearGradient id="em-band" x1="0" x2="0" y1="0" y2="1">
          <stop offset="0" stopColor="var(--color-brass-400)" stopOpacity="0.14" />
          <stop offset="1" stopColor="var(--color-brass-400)" stopOpacity="0.04" />
        </linearGradient>
      </defs>
      {[40, 80, 120, 160].map((y) => (
        <line key={y} x1="0" x2="420" y1={y} y2={y} stroke="white" strokeOpacity="0.06" />
      ))}
      {[60, 140, 220, 300, 380].map((x) => (
        <line key={x} x1={x} x2={x} y1="0" y2="200" stroke="white" strokeOpacity="0.06" />
      ))}
      <path
        d="M0 62 L70 52 L150 58 L250 54 L320 40 L380 70 L420 120 L420 178 L380 132 L320 104 L250 112 L150 116 L70 114 L0 124 Z"
        fill="url(#em-band)"
      />
      <path d="M0 62 L70 52 L150 58 L250 54 L320 40 L380 70 L420 120" fill="none" stroke="var(--color-brass-400)" strokeWidth="1.5" strokeDasharray="5 4" />
      <path d="M0 124 L70 114 L150 116 L250 112 L320 104 L380 132 L420 178" fill="none" stroke="var(--color-brass-400)" strokeWidth="1.5" strokeDasharray="5 4" />
      <path
        d="M0 96 C30 90 50 84 80 86 S140 92 170 86 S230 80 262 84 S300 68 322 66 S360 88 384 104 S410 140 420 150"
        fill="none"
        stroke="var(--color-paper)"
        strokeWidth="2.2"
        strokeLinecap="round"
      />
      <circle cx="322" cy="66" r="5" fill="var(--color-ink-950)" stroke="var(--color-brass-300)" strokeWidth="2" />
      <line x1="322" x2="322" y1="44" y2="60" stroke="var(--color-brass-300)" strokeWidth="1.2" />
      <text x="330" y="36" fill="var(--color-brass-300)" fontSize="10" fontFamily="var(--font-mono)">+0.4 dB</text>
      {[
        [60, '100'],
        [140, '300'],
        [220, '1k'],
        [300, '3k'],
        [380, '10k'],
      ].map(([x, label]) => (
        <text key={label} x={x} y="218" textAnchor="middle" fill="var(--color-ink-500)" fontSize="10" fontFamily="var(--font-mono)">
          {label}
        </text>
      ))}
      <text x="420" y="234" textAnchor="end" fill="var(--color-ink-600)" fontSize="9" fontFamily="var(--font-mono)">
        Hz
      </text>
    </svg>
  );
}

export function SignInRoute() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const expired = params.get('expired') === '1';
  const next = safeNextPath(params.get('next'));

  return (
    <div className="grid min-h-dvh bg-paper lg:grid-cols-[minmax(0,1.05fr)_minmax(0,1fr)]">
      <title>Sign in · Earmark</title>
      <section className="relative hidden overflow-hidden bg-ink-950 px-12 py-10 text-ink-300 lg:flex lg:flex-col">
        <Wordmark />
        <div className="my-auto max-w-lg">
          <p className="mb-4 text-xs font-semibold uppercase tracking-[0.12em] text-brass-300">Firmware audio acceptance</p>
          <h2 className="text-[34px] leading-[1.15] font-semibold tracking-[-0.025em] text-paper">
            Every build measured against the mask your QA team signed off.
          </h2>
          <p className="mt-4 max-w-md text-[15px] leading-relaxed text-ink-300">
            Captures go in, verdicts come out: which bands moved, by how many decibels, and since which commit.
          </p>
          <figure className="mt-10">
            <MaskIllustration />
            <figcaption className="mt-3 flex gap-6 text-xs text-ink-400">
              <span className="flex items-center gap-2">
                <span aria-hidden="true" className="w-5 border-t-[1.5px] border-dashed border-brass-400" />
                Approved mask
              </span>
              <span className="flex items-center gap-2">
                <span aria-hidden="true" className="w-5 border-t-2 border-paper" />
                Measured response
              </span>
            </figcaption>
          </figure>
        </div>
        <p className="text-xs text-ink-500">Signals and residuals can be loud. Listen at a low level.</p>
      </section>

      <section className="flex items-center justify-center px-6 py-12">
        <div className="w-full max-w-[380px]">
          <div className="mb-8 lg:hidden">
            <Wordmark tone="dark" />
          </div>
          <h1 className="text-2xl font-semibold tracking-[-0.02em] text-ink-950">Sign in</h1>
          <p className="mt-1.5 mb-7 text-sm text-ink-600">Use the account your Earmark administrator set up for you.</p>
          {expired ? (
            <p role="status" className="mb-5 rounded-md border border-line-strong bg-paper-raised px-3.5 py-2.5 text-sm text-ink-700">
              Your session ended. Sign in again to pick up where you were.
            </p>
          ) : null}
          <div className="rounded-xl border border-line bg-paper-raised p-6 shadow-[0_1px_2px_rgb(0_0_0/0.04),0_8px_24px_-12px_rgb(0_0_0/0.12)]">
            <SignInForm onSignedIn={() => void navigate(next, { replace: true })} />
          </div>
          <p className="mt-6 text-center text-xs text-ink-500">No account yet? Your Earmark administrator can invite you.</p>
        </div>
      </section>
    </div>
  );
}
