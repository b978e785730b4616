import { canonicalJson } from "@shared/canonical-json";

/** How a parameter is edited: from its code's JSON Schema when it says, else as JSON text. */
export type ParameterKind =
  | { type: "enum"; options: readonly (string | number | boolean | null)[] }
  | { type: "boolean" }
  | { type: "number"; integer: boolean }
  | { type: "string" }
  | { type: "json" };

export type ParameterField = {
  /** Unique within the form: `<stage>.<parameter>`. */
  key: string;
  stage: string;
  name: string;
  kind: ParameterKind;
  /** The run gave this parameter (otherwise the code's default applied and the field starts empty). */
  used: boolean;
  original: unknown;
  description: string | null;
  /** The schema's default, shown as a hint for a parameter the run left out. */
  schemaDefault: unknown;
};

export type StageFields = { stage: string; code: string | null; fields: ParameterField[] };

/** A stage's declared parameters as the runs feature receives them (see runQueries.stageParameters). */
export type StageParameterSchema = {
  stage: string;
  codeName: string;
  codeVersion: string;
  parameters: Record<string, unknown>;
};

/** Longest JSON text accepted in one field (the server bounds whole request bodies too). */
export const MAX_FIELD_CHARS = 10_000;

const isRecord = (value: unknown): value is Record<string, unknown> =>
  typeof value === "object" && value !== null && !Array.isArray(value);

const isPrimitive = (value: unknown): value is string | number | boolean | null =>
  value === null || ["string", "number", "boolean"].includes(typeof value);

function kindOf(property: Record<string, unknown> | undefined): ParameterKind {
  if (!property) return { type: "json" };
  if (Array.isArray(property.enum) && property.enum.length > 0 && property.enum.every(isPrimitive)) {
    return { type: "enum", options: property.enum };
  }
  switch (property.type) {
    case "boolean":
      return { type: "boolean" };
    case "integer":
      return { type: "number", integer: true };
    case "number":
      return { type: "number", integer: false };
    case "string":
      return { type: "string" };
    default:
      return { type: "json" };
  }
}

/** Whether a value the run used fits the declared kind (a mismatch is edited as JSON instead). */
function fits(kind: ParameterKind, value: unknown): boolean {
  switch (kind.type) {
    case "enum":
      return kind.options.some((option) => option === value);
    case "boolean":
      return typeof value === "boolean";
    case "number":
      return typeof value === "number";
    case "string":
      return typeof value === "string";
    case "json":
      return true;
  }
}

/**
 * The fields of a "resubmit with changes" form: per stage, every parameter the run used and every other
 * parameter the stage's code declares. Without the codes' schemas (not loaded, or not readable) each used
 * parameter is edited as JSON.
 */
export function parameterFields(
  used: Record<string, Record<string, unknown>>,
  schemas: readonly StageParameterSchema[] | undefined,
): StageFields[] {
  const stages = schemas?.map((s) => s.stage) ?? Object.keys(used);
  for (const stage of Object.keys(used)) if (!stages.includes(stage)) stages.push(stage);
  return stages.map((stage) => {
    const schema = schemas?.find((s) => s.stage === stage);
    const properties = isRecord(schema?.parameters.properties) ? schema.parameters.properties : {};
    const given = used[stage] ?? {};
    const names = [...Object.keys(given), ...Object.keys(properties).filter((name) => !(name in given))];
    const fields = names.map((name): ParameterField => {
      const property = isRecord(properties[name]) ? properties[name] : undefined;
      const isUsed = name in given;
      const declared = kindOf(property);
      return {
        key: `${stage}.${name}`,
        stage,
        name,
        kind: isUsed && !fits(declared, given[name]) ? { type: "json" } : declared,
        used: isUsed,
        original: given[name],
        description: typeof property?.description === "string" ? property.description : null,
        schemaDefault: property?.default,
      };
    });
    return { stage, code: schema ? `${schema.codeName} ${schema.codeVersion}` : null, fields };
  });
}

/** The text a field starts with: the value the run used, empty for one it left to the code's default. */
export function initialText(field: ParameterField): string {
  if (!field.used) return "";
  if (field.kind.type === "string") return String(field.original);
  if (field.kind.type === "number") return String(field.original);
  return JSON.stringify(field.original);
}

export type FieldReading = { change: false } | { change: true; value: unknown } | { error: string };

/**
 * What a field's text means: no change (empty for a parameter the run left out, or the value it used),
 * a new value, or an error to show beside the field. Select options carry their value as JSON.
 */
export function readField(field: ParameterField, text: string): FieldReading {
  if (text.length > MAX_FIELD_CHARS) return { error: `Keep the value under ${MAX_FIELD_CHARS} characters.` };
  if (!field.used && text === "") return { change: false };
  let value: unknown;
  switch (field.kind.type) {
    case "string":
      value = text;
      break;
    case "number": {
      const trimmed = text.trim();
      const number = Number(trimmed);
      if (trimmed === "" || !Number.isFinite(number)) return { error: "Give a number, such as 0.5 or 1e-6." };
      if (field.kind.integer && !Number.isInteger(number)) return { error: "Give a whole number." };
      value = number;
      break;
    }
    default:
      if (text.trim() === "") return { error: 'Give a value as JSON, e.g. "aug-cc-pvdz", 4 or true.' };
      try {
        value = JSON.parse(text);
      } catch {
        return {
          error: 'Not valid JSON: put text in double quotes ("aug-cc-pvdz"); numbers and true/false bare.',
        };
      }
  }
  if (field.used && canonicalJson(value) === canonicalJson(field.original)) return { change: false };
  return { change: true, value };
}
