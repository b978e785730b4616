import { LogIn } from "lucide-react";
import { useSearchParams } from "react-router-dom";
import { Wordmark } from "@/components/ui/brand-mark";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { ScatteringField } from "@/components/ui/scattering-field";
import { signInHref } from "@/lib/return-to";
import { ModelResultsNote } from "../layouts/model-results-note";

const HIGHLIGHTS = [
  {
    title: "Queue",
    body: "Submit runs to your group's hosts and follow them from queue to output.",
  },
  {
    title: "Track",
    body: "Every run keeps its target, code version, parameters and logs, so results stay traceable.",
  },
  { title: "Derive", body: "Turn eigenphases and K-matrices into cross sections and rate coefficients." },
];

export function SignInRoute() {
  const [searchParams] = useSearchParams();
  const returnTo = searchParams.get("returnTo") ?? "/";
  const failed = searchParams.has("error");

  return (
    <div className="grid min-h-dvh bg-white lg:grid-cols-[minmax(0,1.1fr)_minmax(0,1fr)]">
      <div className="relative hidden overflow-hidden bg-ink-950 lg:block">
        <ScatteringField className="absolute inset-0 h-full w-full" />
        <div className="absolute inset-x-0 bottom-0 bg-gradient-to-t from-ink-950 via-ink-950/80 to-transparent px-12 pt-24 pb-10">
          <p className="max-w-md font-mono text-xs leading-relaxed text-ink-300">
            Trajectories past a repulsive centre, one per impact parameter: the closer the approach, the wider
            the deflection. Cross sections summarise exactly this.
          </p>
        </div>
      </div>
      <main className="flex flex-col justify-between px-6 py-10 sm:px-12 lg:px-16">
        <Wordmark className="text-ink-950" />
        <div className="my-16 max-w-lg">
          <h1 className="text-4xl font-semibold tracking-tight text-ink-950 sm:text-5xl">Sigmaflow</h1>
          <p className="mt-4 text-lg leading-relaxed text-ink-700">
            Queue and track electron–molecule collision calculations on your group's hosts, and turn their
            output into cross sections and rates.
          </p>
          {failed ? (
            <Notice tone="error" title="Sign-in did not complete" className="mt-8">
              Try again. If it keeps failing, ask your site administrator to check your institutional account.
            </Notice>
          ) : null}
          <a href={signInHref(returnTo)} className={buttonClasses({ size: "lg", className: "mt-8" })}>
            <LogIn className="size-5" aria-hidden="true" />
            Sign in with your institution
          </a>
          <p className="mt-4 text-sm text-ink-500">
            You sign in with your institute's account. New here? A group admin invites you by e-mail.
          </p>
          <dl className="mt-12 grid gap-6 border-t border-ink-100 pt-8 sm:grid-cols-3">
            {HIGHLIGHTS.map((item) => (
              <div key={item.title}>
                <dt className="font-mono text-xs font-medium tracking-wide text-flux-700 uppercase">
                  {item.title}
                </dt>
                <dd className="mt-1.5 text-sm leading-relaxed text-ink-600">{item.body}</dd>
              </div>
            ))}
          </dl>
        </div>
        <ModelResultsNote className="max-w-lg" />
      </main>
    </div>
  );
}
