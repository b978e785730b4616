import { safeFileNameSchema } from "@shared/schemas/names";
import {
  base64DecodedBytes,
  type ExtraFile,
  MAX_EXTRA_FILE_BYTES,
  MAX_EXTRA_FILES,
  MAX_EXTRA_FILES_TOTAL_BYTES,
} from "@shared/schemas/run-extra-files";
import { useId, useState } from "react";
import { Button } from "@/components/ui/button";

const KIB = 1024;
/** A size with its unit: bytes below 1 KiB, else KiB with at most one decimal. */
const kib = (bytes: number) =>
  bytes < KIB ? `${bytes} bytes` : `${Number((bytes / KIB).toFixed(1)).toLocaleString("en-US")} KiB`;

/** The file's bytes as standard padded base64, as the run spec carries them. */
function readBase64(file: File): Promise<string> {
  return new Promise((resolve, reject) => {
    const reader = new FileReader();
    reader.onload = () => {
      const url = String(reader.result);
      resolve(url.slice(url.indexOf(",") + 1));
    };
    reader.onerror = () => reject(reader.error ?? new Error("The file could not be read."));
    reader.readAsDataURL(file);
  });
}

type Props = {
  stage: string;
  /** Every extra file of the run (all stages), in the order the spec sends them. */
  files: ExtraFile[];
  onChange: (files: ExtraFile[]) => void;
  /** Server messages by index into `files` (from `spec.extraFiles.N.*`), and for the list as a whole. */
  serverErrors: Record<number, string | undefined>;
  serverListError?: string;
};

/**
 * One stage's extra input files: picked from disk, checked against the run's limits (count, size per
 * file and together, a plain file name once per stage) before anything is sent, each listed with its size
 * and a remove button. The server checks the same and the names against the stage's rendered files.
 */
export function ExtraFilesField({ stage, files, onChange, serverErrors, serverListError }: Props) {
  const id = useId();
  const [localError, setLocalError] = useState<string | null>(null);
  const mine = files.map((file, index) => ({ file, index })).filter(({ file }) => file.stage === stage);
  const totalBytes = files.reduce((sum, file) => sum + base64DecodedBytes(file.contentBase64), 0);
  const errors = [
    localError,
    serverListError,
    ...mine.map(({ file, index }) =>
      serverErrors[index] ? `${file.fileName}: ${serverErrors[index]}` : null,
    ),
  ].filter((message): message is string => Boolean(message));
  const errorId = `${id}-error`;
  const hintId = `${id}-hint`;

  async function add(list: FileList | null) {
    setLocalError(null);
    if (!list || list.length === 0) return;
    const next = [...files];
    let total = totalBytes;
    for (const picked of Array.from(list)) {
      const name = safeFileNameSchema.safeParse(picked.name);
      if (!name.success) {
        setLocalError(`${picked.name}: ${name.error.issues[0]?.message ?? "not a plain file name"}`);
        return;
      }
      if (next.some((file) => file.stage === stage && file.fileName === picked.name)) {
        setLocalError(`${picked.name} is already attached to this stage.`);
        return;
      }
      if (next.length >= MAX_EXTRA_FILES) {
        setLocalError(`A run carries at most ${MAX_EXTRA_FILES} extra files.`);
        return;
      }
      if (picked.size > MAX_EXTRA_FILE_BYTES) {
        setLocalError(
          `${picked.name} is ${picked.size.toLocaleString("en-US")} bytes; at most ${MAX_EXTRA_FILE_BYTES.toLocaleString("en-US")} bytes (${kib(MAX_EXTRA_FILE_BYTES)}) per file.`,
        );
        return;
      }
      if (total + picked.size > MAX_EXTRA_FILES_TOTAL_BYTES) {
        setLocalError(
          `${picked.name} would bring the extra files to ${kib(total + picked.size)}; at most ${kib(MAX_EXTRA_FILES_TOTAL_BYTES)} together.`,
        );
        return;
      }
      try {
        next.push({ stage, fileName: picked.name, contentBase64: await readBase64(picked) });
      } catch (error) {
        setLocalError(`${picked.name}: ${(error as Error).message}`);
        return;
      }
      total += picked.size;
    }
    onChange(next);
  }

  return (
    <div className="flex flex-col gap-1.5">
      <label htmlFor={id} className="text-sm font-medium text-ink-800">
        Extra input files for {stage}
      </label>
      <input
        id={id}
        type="file"
        multiple
        className="text-sm text-ink-700 file:mr-3 file:rounded-lg file:border file:border-ink-200 file:bg-white file:px-3 file:py-1.5 file:text-sm file:font-medium"
        aria-describedby={[hintId, errors.length > 0 ? errorId : null].filter(Boolean).join(" ")}
        aria-invalid={errors.length > 0 ? true : undefined}
        onChange={(event) => {
          const input = event.currentTarget;
          void add(input.files).finally(() => {
            input.value = "";
          });
        }}
      />
      <p id={hintId} className="text-xs text-ink-500">
        Copied byte for byte into the stage's folder. At most {MAX_EXTRA_FILES} files of{" "}
        {kib(MAX_EXTRA_FILE_BYTES)} each, {kib(MAX_EXTRA_FILES_TOTAL_BYTES)} together (now {kib(totalBytes)});
        plain names of letters, digits, '.', '-', '_'.
      </p>
      {mine.length > 0 ? (
        <ul
          className="divide-y divide-ink-100 rounded-lg border border-ink-200 text-sm"
          aria-label={`Extra input files for ${stage}`}
        >
          {mine.map(({ file, index }) => (
            <li key={file.fileName} className="flex items-center justify-between gap-3 px-3 py-1.5">
              <span className="font-mono text-ink-900">{file.fileName}</span>
              <span className="ml-auto tabular-nums text-ink-500">
                {kib(base64DecodedBytes(file.contentBase64))}
              </span>
              <Button
                type="button"
                variant="ghost-danger"
                size="sm"
                aria-label={`Remove ${file.fileName}`}
                onClick={() => onChange(files.filter((_, i) => i !== index))}
              >
                Remove
              </Button>
            </li>
          ))}
        </ul>
      ) : null}
      {errors.length > 0 ? (
        <p id={errorId} role="alert" className="text-sm font-medium text-ember-700">
          {errors.join(" ")}
        </p>
      ) : null}
    </div>
  );
}
