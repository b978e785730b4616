import { Router } from "express";
import { z } from "zod";
import {
  codeDefinitionSchema,
  codeExportSchema,
  codeImportSchema,
  codeListSchema,
  codePreviewRequestSchema,
  codePreviewSchema,
  codeSchema,
  codeUpdateRequestSchema,
} from "../../shared/schemas/codes";
import { requirePrincipal } from "../auth/principal";
import { parseBody, parseParams, shape } from "../http/validate";
import { setCodeHosts } from "../services/code-hosts.service";
import { previewCode } from "../services/code-preview.service";
import {
  createCode,
  deleteCode,
  exportCodes,
  getCode,
  importCodes,
  listCodes,
  setCodeRetired,
} from "../services/codes.service";
import { clientIp, type RouteContext } from "./context";

const groupParams = z.object({ groupId: z.uuid({ error: "groupId must be a UUID" }) });
const codeParams = z.object({ codeId: z.uuid({ error: "codeId must be a UUID" }) });

export function codeRoutes({ db }: RouteContext): Router {
  const router = Router();

  router.get("/groups/:groupId/codes", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    res.json(shape(codeListSchema, { codes: await listCodes(db, principal, groupId) }));
  });

  router.post("/groups/:groupId/codes", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const definition = parseBody(codeDefinitionSchema, req);
    res
      .status(201)
      .json(shape(codeSchema, await createCode(db, principal, groupId, definition, clientIp(req))));
  });

  router.get("/groups/:groupId/codes/export", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const document = shape(codeExportSchema, await exportCodes(db, principal, groupId));
    res.setHeader("content-disposition", 'attachment; filename="sigmaflow-codes.json"');
    res.json(document);
  });

  router.post("/groups/:groupId/codes/import", async (req, res) => {
    const principal = requirePrincipal(req);
    const { groupId } = parseParams(groupParams, req);
    const document = parseBody(codeImportSchema, req);
    const imported = await importCodes(db, principal, groupId, document, clientIp(req));
    res.status(201).json(shape(codeListSchema, { codes: imported }));
  });

  router.get("/codes/:codeId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { codeId } = parseParams(codeParams, req);
    res.json(shape(codeSchema, await getCode(db, principal, codeId)));
  });

  // A POST because parameters are a body; it renders and returns, writing nothing.
  router.post("/codes/:codeId/preview", async (req, res) => {
    const principal = requirePrincipal(req);
    const { codeId } = parseParams(codeParams, req);
    const request = parseBody(codePreviewRequestSchema, req);
    res.json(shape(codePreviewSchema, await previewCode(db, principal, codeId, request)));
  });

  router.patch("/codes/:codeId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { codeId } = parseParams(codeParams, req);
    const { retired, hostIds } = parseBody(codeUpdateRequestSchema, req);
    let code = hostIds ? await setCodeHosts(db, principal, codeId, hostIds, clientIp(req)) : null;
    if (retired !== undefined) code = await setCodeRetired(db, principal, codeId, retired, clientIp(req));
    res.json(shape(codeSchema, code!));
  });

  router.delete("/codes/:codeId", async (req, res) => {
    const principal = requirePrincipal(req);
    const { codeId } = parseParams(codeParams, req);
    await deleteCode(db, principal, codeId, clientIp(req));
    res.status(204).end();
  });

  return router;
}
