import { type Request, type Response, Router } from "express";
import multer from "multer";
import { z } from "zod";
import {
  createIsotopologueRequestSchema,
  createTargetRequestSchema,
  MAX_XYZ_BYTES,
  targetDetailSchema,
  targetListSchema,
  targetVersionSchema,
  updateTargetRequestSchema,
} from "../../shared/schemas/targets";
import { requirePrincipal } from "../auth/principal";
import { AppError, validationError } from "../http/errors";
import { parseBody, parseParams, shape } from "../http/validate";
import {
  createIsotopologue,
  createTarget,
  deleteTarget,
  getTarget,
  getTargetVersion,
  listTargets,
  updateTarget,
} from "../services/targets.service";
import { requireTargetUploadAccess, xyzTextFromUpload } from "../services/targets-upload.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const targetParams = z.object({ targetId: z.uuid({ error: "targetId must be a UUID" }) });
const versionParams = targetParams.extend({
  version: z.coerce
    .number({ error: "version must be a whole number from 1" })
    .int({ error: "version must be a whole number from 1" })
    .min(1, { error: "version must be a whole number from 1" })
    .max(2_147_483_647, { error: "version must be a whole number from 1" }),
});

/**
 * Paths whose request bodies may carry the text of an XYZ file (up to MAX_XYZ_BYTES, escaped in JSON),
 * so app.ts gives them a larger body limit than other routes.
 */
export const TARGET_WRITE_PATHS = ["/groups/:groupId/targets", "/targets/:targetId"];

/** The text fields sent beside an uploaded XYZ file (multipart fields are strings). */
const wholeNumberField = (name: string, min: number, max: number) =>
  z
    .string()
    .trim()
    .regex(/^[-+]?\d{1,3}$/, { error: `${name} must be a whole number from ${min} to ${max}` })
    .transform(Number)
    .pipe(
      z
        .int()
        .min(min, { error: `${name} must be at least ${min}` })
        .max(max, { error: `${name} must be at most ${max}` }),
    );
const uploadFieldsSchema = z.strictObject({
  name: z.string(),
  charge: wholeNumberField("charge", -10, 10).optional(),
  multiplicity: z
    .union([z.literal("").transform(() => undefined), wholeNumberField("multiplicity", 1, 20)])
    .optional(),
  notes: z.string().optional(),
});

/**
 * One XYZ file of at most MAX_XYZ_BYTES held in memory (never on disk), in the form field "file", beside
 * at most four short text fields. Limits are checked while the body streams in.
 */
const xyzUpload = multer({
  storage: multer.memoryStorage(),
  limits: {
    fileSize: MAX_XYZ_BYTES,
    files: 1,
    fields: 4,
    fieldSize: 16 * 1024,
    fieldNameSize: 100,
    parts: 5,
  },
}).single("file");

const KIB = MAX_XYZ_BYTES / 1024;

/** Runs the multipart reader and turns its refusals into errors that name the problem. */
function receiveXyzUpload(req: Request, res: Response): Promise<void> {
  if (!req.is("multipart/form-data")) {
    return Promise.reject(
      new AppError(
        415,
        "unsupported_media_type",
        'Send the XYZ file as multipart/form-data in the field "file".',
      ),
    );
  }
  return new Promise((resolve, reject) => {
    xyzUpload(req, res, (error: unknown) => {
      if (!error) return resolve();
      if (error instanceof multer.MulterError) {
        if (error.code === "LIMIT_FILE_SIZE") {
          return reject(
            new AppError(
              413,
              "file_too_large",
              `The XYZ file is larger than ${KIB} KiB (${MAX_XYZ_BYTES} bytes), the most accepted.`,
              {
                path: "file",
                maxBytes: MAX_XYZ_BYTES,
              },
            ),
          );
        }
        if (error.code === "LIMIT_FIELD_VALUE") {
          return reject(
            new AppError(413, "field_too_large", `The field "${error.field}" is longer than 16 KiB.`, {
              path: error.field,
            }),
          );
        }
        return reject(
          new AppError(
            422,
            "invalid_upload",
            'Send one XYZ file in the field "file" and only the fields name, charge, multiplicity and notes.',
            {
              path: error.field ?? "file",
              reason: error.code,
            },
          ),
        );
      }
      reject(
        new AppError(
          400,
          "invalid_multipart",
          "The multipart body could not be read; send it again as multipart/form-data.",
        ),
      );
    });
  });
}

export function targetRoutes({ db }: RouteContext): Router {
  const router = Router();

  // The group is checked before the body is read: a non-member learns nothing from the limits.
  router.post("/groups/:groupId/targets/upload", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    await requireTargetUploadAccess(db, principal, groupId);
    await receiveXyzUpload(req, res);
    const fields = uploadFieldsSchema.safeParse({ ...req.body });
    if (!fields.success) throw validationError(fields.error, "body");
    if (!req.file) {
      throw new AppError(422, "missing_file", 'Attach the XYZ file in the form field "file".', {
        path: "file",
      });
    }
    const input = createTargetRequestSchema.safeParse({
      ...fields.data,
      xyz: xyzTextFromUpload(req.file.buffer, req.file.originalname || "the file"),
    });
    if (!input.success) throw validationError(input.error, "body");
    res
      .status(201)
      .json(shape(targetDetailSchema, await createTarget(db, principal, groupId, input.data, clientIp(req))));
  });

  router.get("/groups/:groupId/targets", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(targetListSchema, { targets: await listTargets(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/targets", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const input = parseBody(createTargetRequestSchema, req);
    res
      .status(201)
      .json(shape(targetDetailSchema, await createTarget(db, principal, groupId, input, clientIp(req))));
  });

  router.get("/targets/:targetId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    res.json(shape(targetDetailSchema, await getTarget(db, principal, targetId)));
  });

  router.get("/targets/:targetId/versions/:version", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId, version } = parseParams(versionParams, req);
    res.json(shape(targetVersionSchema, await getTargetVersion(db, principal, targetId, version)));
  });

  router.patch("/targets/:targetId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    const input = parseBody(updateTargetRequestSchema, req);
    res.json(shape(targetDetailSchema, await updateTarget(db, principal, targetId, input, clientIp(req))));
  });

  router.post("/targets/:targetId/isotopologues", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    const input = parseBody(createIsotopologueRequestSchema, req);
    res
      .status(201)
      .json(
        shape(targetDetailSchema, await createIsotopologue(db, principal, targetId, input, clientIp(req))),
      );
  });

  router.delete("/targets/:targetId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { targetId } = parseParams(targetParams, req);
    await deleteTarget(db, principal, targetId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
