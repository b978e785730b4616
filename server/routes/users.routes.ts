import { Router } from "express";
import { adminUserListSchema } from "../../shared/schemas/users";
import { requirePrincipal } from "../auth/principal";
import { shape } from "../http/validate";
import { listUsersForAdmin } from "../services/users.service";
import type { RouteContext } from "./context";

export function userRoutes({ db }: RouteContext): Router {
  const router = Router();
  router.get("/admin/users", async (req, res) => {
    res.json(shape(adminUserListSchema, { users: await listUsersForAdmin(db, requirePrincipal(req)) }));
  });
  return router;
}
