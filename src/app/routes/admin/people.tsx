import { PageHeader } from "@/components/ui/page-header";
import { PeopleTable } from "@/features/admin/components/people-table";

export function AdminPeopleRoute() {
  return (
    <>
      <PageHeader
        eyebrow="Site administration"
        title="People"
        description="Everyone who has signed in to this Sigmaflow site, with their number of groups and last sign-in."
      />
      <PeopleTable />
    </>
  );
}
