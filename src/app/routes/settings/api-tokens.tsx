import { Card, CardBody, CardHeader } from "@/components/ui/card";
import { PageHeader } from "@/components/ui/page-header";
import { CreateTokenPanel } from "@/features/api-tokens/components/create-token-panel";
import { TokenList } from "@/features/api-tokens/components/token-list";
import { TokenUsage } from "@/features/api-tokens/components/token-usage";

export function ApiTokensRoute() {
  return (
    <>
      <PageHeader
        eyebrow="Settings"
        title="API tokens"
        description="Personal tokens let scripts, on your own machine or on a host, call Sigmaflow as you, without a browser session."
      />
      <div className="grid gap-8 2xl:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="flex min-w-0 flex-col gap-8">
          <Card>
            <CardHeader title="Create a token" />
            <CardBody>
              <CreateTokenPanel />
            </CardBody>
          </Card>
          <section aria-labelledby="your-tokens" className="flex flex-col gap-3">
            <h2 id="your-tokens" className="text-base font-semibold text-ink-900">
              Your tokens
            </h2>
            <TokenList />
          </section>
        </div>
        <Card className="h-fit">
          <CardHeader title="Using a token" />
          <CardBody>
            <TokenUsage />
          </CardBody>
        </Card>
      </div>
    </>
  );
}
