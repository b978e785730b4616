import { z } from "zod";
import { isApiRequestError } from "./api-error";

export type FieldErrors = Partial<Record<string, string>>;

const issueSchema = z.object({
  path: z.union([z.array(z.union([z.string(), z.number()])), z.string()]),
  message: z.string(),
});
const flattenedSchema = z.object({ fieldErrors: z.record(z.string(), z.array(z.string()).optional()) });
const treeSchema = z.object({
  properties: z.record(z.string(), z.object({ errors: z.array(z.string()) }).optional()),
});
const plainSchema = z.record(z.string(), z.union([z.string(), z.array(z.string())]));

function fromIssues(issues: z.infer<typeof issueSchema>[]): FieldErrors {
  const result: FieldErrors = {};
  for (const issue of issues) {
    const key = Array.isArray(issue.path) ? issue.path.join(".") : issue.path;
    if (key && result[key] === undefined) result[key] = issue.message;
  }
  return result;
}

/**
 * Field messages from a 422's `details`. The common shapes zod-based servers send are accepted:
 * an issue list (`[{ path, message }]` or `{ issues: [...] }`), `z.flattenError` (`{ fieldErrors }`),
 * `z.treeifyError` (`{ properties }`) and a plain `{ field: message }` map.
 */
export function fieldErrorsFromDetails(details: unknown): FieldErrors {
  const issues = z.array(issueSchema).safeParse(details);
  if (issues.success) return fromIssues(issues.data);

  const wrapped = z.object({ issues: z.array(issueSchema) }).safeParse(details);
  if (wrapped.success) return fromIssues(wrapped.data.issues);

  const flattened = flattenedSchema.safeParse(details);
  if (flattened.success) {
    const result: FieldErrors = {};
    for (const [key, messages] of Object.entries(flattened.data.fieldErrors)) {
      if (messages?.[0]) result[key] = messages[0];
    }
    return result;
  }

  const tree = treeSchema.safeParse(details);
  if (tree.success) {
    const result: FieldErrors = {};
    for (const [key, node] of Object.entries(tree.data.properties)) {
      if (node?.errors[0]) result[key] = node.errors[0];
    }
    return result;
  }

  const plain = plainSchema.safeParse(details);
  if (plain.success) {
    const result: FieldErrors = {};
    for (const [key, value] of Object.entries(plain.data)) {
      const message = Array.isArray(value) ? value[0] : value;
      if (message) result[key] = message;
    }
    return result;
  }
  return {};
}

/** Field messages carried by a failed request, if it was a 422 validation failure. */
export function fieldErrorsFromError(error: unknown): FieldErrors {
  if (!isApiRequestError(error) || error.status !== 422) return {};
  return fieldErrorsFromDetails(error.details);
}

/** Client-side check with the same zod schema the server uses, reduced to one message per field. */
export function fieldErrorsFromZod(error: z.ZodError): FieldErrors {
  return fromIssues(error.issues.map((issue) => ({ path: issue.path.map(String), message: issue.message })));
}
