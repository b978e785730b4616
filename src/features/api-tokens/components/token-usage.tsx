/** How to call the API with a token; the example uses this page's own origin. */
export function TokenUsage() {
  const origin = window.location.origin;
  return (
    <div className="flex flex-col gap-3 text-sm text-ink-700">
      <p>
        Send the token in the <code className="font-mono text-ink-900">Authorization</code> header of each
        request:
      </p>
      <pre className="overflow-x-auto rounded-lg bg-ink-950 px-4 py-3 font-mono text-xs leading-relaxed text-ink-100">
        <code>
          <span className="text-flux-300">Authorization:</span> Bearer &lt;token&gt;
        </code>
      </pre>
      <p>For example, to check which account a token belongs to:</p>
      <pre className="overflow-x-auto rounded-lg bg-ink-950 px-4 py-3 font-mono text-xs leading-relaxed text-ink-100">
        <code>{`curl \\\n  -H "Authorization: Bearer $SIGMAFLOW_TOKEN" \\\n  ${origin}/api/me`}</code>
      </pre>
      <p className="text-ink-500">
        A token acts as you, with your groups and roles. Keep it out of shared scripts and version control;
        read it from an environment variable instead.
      </p>
    </div>
  );
}
