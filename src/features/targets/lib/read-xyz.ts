/**
 * Reads the text of an XYZ file in the browser into editor rows, with the same parser the server uses
 * (shared/science/geometry), so a dropped or pasted file fills the atom table before anything is saved.
 * The file is hostile: size, binary content and every parser complaint are messages naming the line.
 */
import { MAX_XYZ_BYTES } from "@shared/schemas";
import { ScienceInputError } from "@shared/science/errors";
import { parseGeometry } from "@shared/science/geometry";
import { type DraftAtom, draftAtom } from "./target-draft";

// biome-ignore lint/suspicious/noControlCharactersInRegex: finding control characters is the point.
const BINARY = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/;

export type XyzReading = { ok: true; atoms: DraftAtom[]; comment: string } | { ok: false; message: string };

export function readXyzText(text: string): XyzReading {
  const bytes = new TextEncoder().encode(text).length;
  if (bytes > MAX_XYZ_BYTES) {
    return {
      ok: false,
      message: `The file is ${bytes} bytes long; at most ${MAX_XYZ_BYTES} bytes (256 KiB) are accepted.`,
    };
  }
  const binary = BINARY.exec(text);
  if (binary) {
    const line = text.slice(0, binary.index).split("\n").length;
    return {
      ok: false,
      message: `Line ${line}: contains a control character; is this a binary file? Choose an XYZ text file.`,
    };
  }
  try {
    const parsed = parseGeometry(text);
    return {
      ok: true,
      atoms: parsed.atoms.map((atom) => draftAtom(atom.symbol, atom.massNumber, atom.positionAngstrom)),
      comment: parsed.comment,
    };
  } catch (error) {
    if (error instanceof ScienceInputError) return { ok: false, message: error.message };
    throw error;
  }
}

/** Reads a chosen or dropped file, refusing one over the size limit before reading it. */
export async function readXyzFile(file: File): Promise<XyzReading> {
  if (file.size > MAX_XYZ_BYTES) {
    return {
      ok: false,
      message: `${file.name} is ${file.size} bytes long; at most ${MAX_XYZ_BYTES} bytes (256 KiB) are accepted.`,
    };
  }
  return readXyzText(await file.text());
}
