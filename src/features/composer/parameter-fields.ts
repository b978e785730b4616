import { wordsOfName } from "./field-text";

/**
 * The fields of a stage's parameter form, read from its code's JSON Schema: one field per top-level
 * property, with its label, unit, description and default. Anything the form cannot draw as a plain
 * control (objects, arrays other than energy grids) is edited as JSON text.
 */

export type FieldKind =
  | { type: "enum"; options: readonly (string | number | boolean | null)[] }
  | { type: "boolean" }
  | {
      type: "number";
      integer: boolean;
      minimum?: number;
      maximum?: number;
      exclusiveMinimum?: number;
      exclusiveMaximum?: number;
    }
  | { type: "string"; maxLength?: number }
  | { type: "energy-grid"; maxItems?: number }
  | { type: "json" };

export type SchemaField = {
  name: string;
  /** The schema's `title`, else the name in words without its unit suffix ("Polarizability"). */
  label: string;
  kind: FieldKind;
  required: boolean;
  /** The unit the schema names (`unit`, or `…, eV` / `in eV` ending its description), or null. */
  unit: string | null;
  description: string | null;
  defaultValue: unknown;
};

const isRecord = (value: unknown): value is Record<string, unknown> =>
  typeof value === "object" && value !== null && !Array.isArray(value);
const isPrimitive = (value: unknown): value is string | number | boolean | null =>
  value === null || ["string", "number", "boolean"].includes(typeof value);
const numberOrUndefined = (value: unknown) => (typeof value === "number" ? value : undefined);

/** "Cut-off radius r_c of the polarization term, bohr." → "bohr"; "Collision energies in eV, …" → "eV". */
function unitOf(name: string, property: Record<string, unknown>): string | null {
  if (typeof property.unit === "string" && property.unit.trim()) return property.unit.trim();
  const description = typeof property.description === "string" ? property.description : "";
  // "…, bohr." / "…, bohr³ (1 Å³ = 6.748 bohr³)." / "…, hartree"
  const trailing = /,\s*([^\s,.()]{1,12})\s*(?:\(.*\))?\.?$/u.exec(description);
  if (trailing?.[1]) return trailing[1];
  const inUnit = /\bin\s+(eV|meV|hartree|bohr|Å|K|s|min)\b/u.exec(description);
  if (inUnit?.[1]) return inUnit[1];
  if (/Ev$/.test(name)) return "eV";
  if (/Bohr3$/.test(name)) return "bohr³";
  if (/Bohr$/.test(name)) return "bohr";
  return null;
}

function isEnergyArray(name: string, property: Record<string, unknown>, unit: string | null): boolean {
  if (property.type !== "array" || !isRecord(property.items)) return false;
  if (property.items.type !== "number" && property.items.type !== "integer") return false;
  return unit === "eV" || /Ev$/.test(name);
}

function kindOf(name: string, property: Record<string, unknown>, unit: string | null): FieldKind {
  if (Array.isArray(property.enum) && property.enum.length > 0 && property.enum.every(isPrimitive)) {
    return { type: "enum", options: property.enum };
  }
  if (isEnergyArray(name, property, unit)) {
    return { type: "energy-grid", maxItems: numberOrUndefined(property.maxItems) };
  }
  switch (property.type) {
    case "boolean":
      return { type: "boolean" };
    case "integer":
    case "number":
      return {
        type: "number",
        integer: property.type === "integer",
        minimum: numberOrUndefined(property.minimum),
        maximum: numberOrUndefined(property.maximum),
        exclusiveMinimum: numberOrUndefined(property.exclusiveMinimum),
        exclusiveMaximum: numberOrUndefined(property.exclusiveMaximum),
      };
    case "string":
      return { type: "string", maxLength: numberOrUndefined(property.maxLength) };
    default:
      return { type: "json" };
  }
}

/** The form's fields for a parameters schema (`type: "object"`), in the schema's property order. */
export function fieldsOfSchema(schema: Record<string, unknown>): SchemaField[] {
  const properties = isRecord(schema.properties) ? schema.properties : {};
  const required = new Set(Array.isArray(schema.required) ? schema.required.map(String) : []);
  return Object.entries(properties)
    .filter((entry): entry is [string, Record<string, unknown>] => isRecord(entry[1]))
    .map(([name, property]) => {
      const unit = unitOf(name, property);
      return {
        name,
        label:
          typeof property.title === "string" && property.title.trim()
            ? property.title.trim()
            : wordsOfName(name),
        kind: kindOf(name, property, unit),
        required: required.has(name),
        unit,
        description: typeof property.description === "string" ? property.description : null,
        defaultValue: property.default,
      };
    });
}

/** The values a fresh form starts from: each field's default, JSON fields as their JSON text. */
export function defaultValuesOf(fields: SchemaField[]): Record<string, unknown> {
  const values: Record<string, unknown> = {};
  for (const field of fields) {
    if (field.defaultValue === undefined) {
      values[field.name] =
        field.kind.type === "boolean" ? false : field.kind.type === "energy-grid" ? [] : "";
    } else if (field.kind.type === "json") {
      values[field.name] = JSON.stringify(field.defaultValue);
    } else {
      values[field.name] = field.defaultValue;
    }
  }
  return values;
}

/**
 * The parameters a form's values stand for: empty fields are left out (the code's default applies, as
 * on the server), number fields are numbers, JSON fields their parsed value (text that is not JSON is
 * kept as text, so validation names the field).
 */
export function parametersOf(
  fields: SchemaField[],
  values: Record<string, unknown>,
): Record<string, unknown> {
  const parameters: Record<string, unknown> = {};
  for (const field of fields) {
    const value = values[field.name];
    if (value === undefined || value === "" || (Array.isArray(value) && value.length === 0)) continue;
    if (field.kind.type === "enum") {
      // A select holds text; the option it stands for may be a number or a boolean.
      const option = field.kind.options.find((candidate) => String(candidate) === String(value));
      parameters[field.name] = option === undefined ? value : option;
    } else if (field.kind.type === "number") {
      const number = typeof value === "number" ? value : Number(String(value).trim());
      parameters[field.name] = Number.isFinite(number) ? number : value;
    } else if (field.kind.type === "json" && typeof value === "string") {
      try {
        parameters[field.name] = JSON.parse(value);
      } catch {
        parameters[field.name] = value;
      }
    } else {
      parameters[field.name] = value;
    }
  }
  return parameters;
}
