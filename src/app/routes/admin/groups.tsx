import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { PageHeader } from "@/components/ui/page-header";
import { CreateGroupForm } from "@/features/groups/components/create-group-form";
import { GroupTable } from "@/features/groups/components/group-table";

export function AdminGroupsRoute() {
  return (
    <>
      <PageHeader
        eyebrow="Site administration"
        title="Groups"
        description="Every research group on this Sigmaflow site. Open one to manage its members."
      />
      <div className="flex flex-col gap-8">
        <GroupTable />
        <Card>
          <CardHeader
            title="Create group"
            description="A group shares hosts, codes, recipes, targets and runs. Invite its first admin once it exists."
          />
          <CardBody>
            <CreateGroupForm />
          </CardBody>
        </Card>
      </div>
    </>
  );
}
