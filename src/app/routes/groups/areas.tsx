import { type LucideIcon, TrendingUp } from "lucide-react";
import { EmptyState } from "@/components/ui/empty-state";
import { PageHeader } from "@/components/ui/page-header";
import { useCurrentGroup } from "./use-current-group";

type Area = {
  title: string;
  summary: string;
  icon: LucideIcon;
  emptyTitle: string;
  emptyBody: string;
  /** What the page will hold. */
  holds: string[];
  /** What people will do on it. */
  tasks: string[];
};

const AREAS = {
  studies: {
    title: "Studies",
    summary: "Collections of finished runs turned into physical quantities you can compare and export.",
    icon: TrendingUp,
    emptyTitle: "No studies yet",
    emptyBody: "Studies build on finished runs; the first one can be started once runs exist.",
    holds: [
      "Integral and momentum-transfer cross sections against collision energy",
      "Rate coefficients against temperature, and resonance positions and widths fitted from eigenphase sums",
    ],
    tasks: [
      "Compare runs that differ in basis set or target model to judge convergence",
      "Export tables of cross sections and rates for your plasma or astrochemistry models",
    ],
  },
} satisfies Record<string, Area>;

function AreaPage({ area }: { area: Area }) {
  const { group } = useCurrentGroup();
  const Icon = area.icon;
  return (
    <>
      <PageHeader eyebrow={group.name} title={area.title} description={area.summary} />
      <EmptyState icon={<Icon className="size-5" aria-hidden="true" />} title={area.emptyTitle}>
        {area.emptyBody}
      </EmptyState>
      <div className="mt-8 grid gap-6 md:grid-cols-2">
        <section className="rounded-xl border border-ink-100 bg-white p-5">
          <h2 className="text-sm font-semibold text-ink-900">What will live here</h2>
          <ul className="mt-3 flex list-disc flex-col gap-2 pl-5 text-sm text-ink-600 marker:text-flux-500">
            {area.holds.map((item) => (
              <li key={item}>{item}</li>
            ))}
          </ul>
        </section>
        <section className="rounded-xl border border-ink-100 bg-white p-5">
          <h2 className="text-sm font-semibold text-ink-900">What you will do here</h2>
          <ul className="mt-3 flex list-disc flex-col gap-2 pl-5 text-sm text-ink-600 marker:text-flux-500">
            {area.tasks.map((item) => (
              <li key={item}>{item}</li>
            ))}
          </ul>
        </section>
      </div>
    </>
  );
}

export function StudiesRoute() {
  return <AreaPage area={AREAS.studies} />;
}
