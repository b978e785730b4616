import { PageHeader } from "@/components/ui/page-header";
import { NotFoundState } from "./route-error-boundary";

export function NotFoundRoute() {
  return (
    <>
      <PageHeader title="Page not found" />
      <NotFoundState />
    </>
  );
}
