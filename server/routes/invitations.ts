import { Router } from "express";
import { AcceptInvitationBody, CreateInvitationBody, InvitationParams, InvitationTokenParams } from "@shared/schemas/labs";
import type { AppContext } from "../context";
import { labGuards } from "../middleware/lab-access";
import { acceptInvitation, createInvitation, listInvitations, previewInvitation, revokeInvitation } from "../services/invitations";
import { getMe } from "../services/users";
import { startSession } from "./auth";

export function invitationsRouter(ctx: AppContext): Router {
  const router = Router();
  const guard = labGuards(ctx.db);

  router.get("/labs/:labId/invitations", guard.lead, (_req, res) => {
    res.json(listInvitations(ctx.db, res.locals.labId!));
  });

  router.post("/labs/:labId/invitations", guard.lead, async (req, res) => {
    const body = CreateInvitationBody.parse(req.body);
    const invitation = await createInvitation(ctx.db, ctx.mailer, {
      labId: res.locals.labId!,
      inviterId: res.locals.user!.id,
      email: body.email,
      role: body.role,
      publicUrl: ctx.publicUrl,
    });
    res.status(201).json(invitation);
  });

  router.delete("/labs/:labId/invitations/:invitationId", guard.lead, (req, res) => {
    const params = InvitationParams.parse(req.params);
    revokeInvitation(ctx.db, params.labId, res.locals.user!.id, params.invitationId);
    res.status(204).end();
  });

  router.get("/invitations/:token", (req, res) => {
    const { token } = InvitationTokenParams.parse(req.params);
    res.json(previewInvitation(ctx.db, token));
  });

  router.post("/invitations/:token/accept", async (req, res) => {
    const { token } = InvitationTokenParams.parse(req.params);
    const body = AcceptInvitationBody.parse(req.body ?? {});
    const caller = res.locals.user ? { id: res.locals.user.id } : null;
    const { userId, created } = await acceptInvitation(ctx.db, token, body, caller);
    // A new account is signed in here; an existing one is already signed in (that was required).
    if (created) await startSession(ctx, req, res, userId);
    res.json(getMe(ctx.db, userId));
  });

  return router;
}
