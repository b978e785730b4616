import type { RequestHandler } from "express";
import type { Database } from "../db/client";
import { AppError } from "../http/errors";
import { authenticateApiToken } from "../services/tokens.service";

/** `Authorization: Bearer sf_...` authenticates a script as the token's owner for this request only. */
export function bearerAuth(db: Database): RequestHandler {
  return async (req, _res, next) => {
    const header = req.get("authorization");
    if (!header) return next();
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (!match)
      throw new AppError(401, "bad_authorization", "Use the header `Authorization: Bearer <token>`.");
    const principal = await authenticateApiToken(db, match[1]!);
    if (!principal) throw new AppError(401, "invalid_token", "The API token is unknown, revoked or expired.");
    req.user = principal;
    next();
  };
}
