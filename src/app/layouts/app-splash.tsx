import { BrandMark } from "@/components/ui/brand-mark";
import { Spinner } from "@/components/ui/spinner";

/** First paint while the session and the first page load. */
export function AppSplash() {
  return (
    <div className="flex min-h-dvh flex-col items-center justify-center gap-4 bg-ink-950 text-ink-200">
      <BrandMark className="size-12" />
      <Spinner label="Loading Sigmaflow" className="text-sm text-ink-300" />
    </div>
  );
}
