/**
 * The top-level parameters a code's JSON Schema declares, as rows the Codes page lists and the preview
 * form edits: name, type, default, unit, description, whether required, allowed values and bounds.
 * Anything the schema nests deeper is shown and edited as JSON.
 */
export type ParameterRow = {
  name: string;
  type: string;
  required: boolean;
  default: unknown;
  hasDefault: boolean;
  unit: string | null;
  description: string | null;
  allowed: unknown[] | null;
  minimum: number | null;
  maximum: number | null;
};

const isRecord = (value: unknown): value is Record<string, unknown> =>
  typeof value === "object" && value !== null && !Array.isArray(value);

function typeOf(schema: Record<string, unknown>): string {
  if (typeof schema.type === "string") return schema.type;
  if (Array.isArray(schema.type)) return schema.type.filter((t) => typeof t === "string").join(" | ");
  if (Array.isArray(schema.enum)) return "enum";
  if ("const" in schema) return "const";
  return "any";
}

const numberOrNull = (value: unknown) => (typeof value === "number" ? value : null);

export function parameterRows(schema: Record<string, unknown>): ParameterRow[] {
  const properties = isRecord(schema.properties) ? schema.properties : {};
  const required = new Set(
    Array.isArray(schema.required) ? schema.required.filter((n) => typeof n === "string") : [],
  );
  return Object.entries(properties).map(([name, raw]) => {
    const property = isRecord(raw) ? raw : {};
    return {
      name,
      type: typeOf(property),
      required: required.has(name),
      default: property.default,
      hasDefault: Object.hasOwn(property, "default"),
      unit: typeof property.unit === "string" ? property.unit : null,
      description:
        typeof property.description === "string"
          ? property.description
          : typeof property.title === "string"
            ? property.title
            : null,
      allowed: Array.isArray(property.enum) ? property.enum : null,
      minimum: numberOrNull(property.minimum ?? property.exclusiveMinimum),
      maximum: numberOrNull(property.maximum ?? property.exclusiveMaximum),
    };
  });
}

/** A value as the parameter table prints it. */
export function printValue(value: unknown): string {
  if (value === undefined) return "—";
  if (typeof value === "string") return value;
  return JSON.stringify(value);
}

/** Bounds as "≥ 0, ≤ 10" (exclusive bounds printed as > and <). */
export function printBounds(schema: Record<string, unknown>, name: string): string | null {
  const properties = isRecord(schema.properties) ? schema.properties : {};
  const property = isRecord(properties[name]) ? properties[name] : {};
  const parts: string[] = [];
  if (typeof property.minimum === "number") parts.push(`≥ ${property.minimum}`);
  if (typeof property.exclusiveMinimum === "number") parts.push(`> ${property.exclusiveMinimum}`);
  if (typeof property.maximum === "number") parts.push(`≤ ${property.maximum}`);
  if (typeof property.exclusiveMaximum === "number") parts.push(`< ${property.exclusiveMaximum}`);
  return parts.length > 0 ? parts.join(", ") : null;
}
