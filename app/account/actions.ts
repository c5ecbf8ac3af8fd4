"use server";

import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { revalidatePath } from "next/cache";
import { safeRedirectPath } from "@/lib/auth/safe-redirect";
import { z } from "zod";
import { acceptInvitation, AccountError, invitationUrl, changePassword, createApiToken, createInvitation, createUser, revokeApiToken, roleSchema, SESSION_COOKIE, setMembershipRole, signIn, signInSchema, signOut, signUpSchema, tokenScopeSchema } from "@/lib/auth/accounts";
import { can } from "@/lib/auth/permissions";
import { getDb } from "@/lib/db";
import { getEnv } from "@/lib/env";
import { getClientAddress, getPublicOrigin, getViewer } from "@/app/_lib/viewer";

export type FormState = { ok: boolean; message: string; fieldErrors?: Record<string, string[]>; secret?: string } | null;

function fieldErrorsOf(error: z.ZodError): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const issue of error.issues) (out[issue.path.join(".") || "form"] ??= []).push(issue.message);
  return out;
}

async function startSession(sessionSecret: string, expiresAt: Date) {
  (await cookies()).set(SESSION_COOKIE, sessionSecret, {
    httpOnly: true,
    sameSite: "lax",
    secure: getEnv().NODE_ENV === "production" && !getEnv().LAPSEBANK_INSECURE_COOKIES,
    path: "/",
    expires: expiresAt,
  });
}

export async function signUpAction(_: FormState, formData: FormData): Promise<FormState> {
  const parsed = signUpSchema.safeParse({ email: formData.get("email"), password: formData.get("password"), displayName: formData.get("displayName") });
  if (!parsed.success) return { ok: false, message: "Some fields need attention", fieldErrors: fieldErrorsOf(parsed.error) };
  const db = getDb();
  // Signing up from an invitation link joins its school at once (and is how an invitation-only program admits people).
  const invitationSecret = String(formData.get("invitation") ?? "").trim();
  let joined = false;
  try {
    const user = await createUser(db, parsed.data, invitationSecret ? { invitationSecret } : {});
    joined = user.joined !== null;
    const session = await signIn(db, parsed.data, await getClientAddress());
    await startSession(session.sessionSecret, session.expiresAt);
  } catch (error) {
    if (error instanceof AccountError) return { ok: false, message: error.message };
    throw error;
  }
  redirect(joined ? "/account?joined=1" : safeRedirectPath(formData.get("next"), "/account"));
}

export async function signInAction(_: FormState, formData: FormData): Promise<FormState> {
  const parsed = signInSchema.safeParse({ email: formData.get("email"), password: formData.get("password") });
  if (!parsed.success) return { ok: false, message: "Some fields need attention", fieldErrors: fieldErrorsOf(parsed.error) };
  try {
    const session = await signIn(getDb(), parsed.data, await getClientAddress());
    await startSession(session.sessionSecret, session.expiresAt);
  } catch (error) {
    if (error instanceof AccountError) return { ok: false, message: error.message };
    throw error;
  }
  redirect(safeRedirectPath(formData.get("next"), "/flights"));
}

export async function signOutAction(): Promise<void> {
  const store = await cookies();
  const secret = store.get(SESSION_COOKIE)?.value;
  if (secret) await signOut(getDb(), secret);
  store.delete(SESSION_COOKIE);
  redirect("/");
}

export async function changePasswordAction(_: FormState, formData: FormData): Promise<FormState> {
  const viewer = await getViewer();
  if (viewer.kind !== "member") return { ok: false, message: "Sign in first." };
  try {
    const keepSessionSecret = (await cookies()).get(SESSION_COOKIE)?.value;
    const { sessionsEnded } = await changePassword(getDb(), viewer.userId, String(formData.get("currentPassword") ?? ""), String(formData.get("newPassword") ?? ""), keepSessionSecret ? { keepSessionSecret } : {});
    return { ok: true, message: sessionsEnded > 0 ? `Password changed. You were signed out everywhere else (${sessionsEnded} other ${sessionsEnded === 1 ? "session" : "sessions"}).` : "Password changed." };
  } catch (error) {
    if (error instanceof AccountError) return { ok: false, message: error.message };
    throw error;
  }
}

const tokenFormSchema = z.object({ schoolId: z.string().min(1, "Choose a school"), name: z.string().trim().min(1, "Name the token").max(80), scopes: z.array(tokenScopeSchema).min(1, "Choose at least one scope") });

export async function createTokenAction(_: FormState, formData: FormData): Promise<FormState> {
  const viewer = await getViewer();
  if (viewer.kind !== "member") return { ok: false, message: "Sign in first." };
  const parsed = tokenFormSchema.safeParse({ schoolId: formData.get("schoolId"), name: formData.get("name"), scopes: formData.getAll("scopes") });
  if (!parsed.success) return { ok: false, message: "Some fields need attention", fieldErrors: fieldErrorsOf(parsed.error) };
  try {
    const { token } = await createApiToken(getDb(), { userId: viewer.userId, ...parsed.data });
    revalidatePath("/account");
    return { ok: true, message: "Copy this token now: it is shown only once.", secret: token };
  } catch (error) {
    if (error instanceof AccountError) return { ok: false, message: error.message };
    throw error;
  }
}

export async function revokeTokenAction(formData: FormData): Promise<void> {
  const viewer = await getViewer();
  if (viewer.kind !== "member") redirect("/account");
  try {
    await revokeApiToken(getDb(), String(formData.get("tokenId") ?? ""), viewer.userId);
  } catch (error) {
    // Someone else's token, or none: the same answer, so token ids reveal nothing.
    if (error instanceof AccountError) redirect("/account?error=token-not-found");
    throw error;
  }
  revalidatePath("/account");
}

export async function acceptInvitationAction(formData: FormData): Promise<void> {
  const viewer = await getViewer();
  const secret = String(formData.get("secret") ?? "");
  if (viewer.kind !== "member") redirect(`/account?next=${encodeURIComponent(`/invite/${secret}`)}&invitation=${encodeURIComponent(secret)}`);
  try {
    await acceptInvitation(getDb(), secret, viewer.userId);
  } catch (error) {
    if (error instanceof AccountError) redirect(`/invite/${encodeURIComponent(secret)}?error=${encodeURIComponent(error.message)}`);
    throw error;
  }
  redirect("/account?joined=1");
}

const inviteSchema = z.object({ schoolId: z.string().min(1), role: roleSchema });

export async function createInvitationAction(_: FormState, formData: FormData): Promise<FormState> {
  const viewer = await getViewer();
  const parsed = inviteSchema.safeParse({ schoolId: formData.get("schoolId"), role: formData.get("role") });
  if (!parsed.success) return { ok: false, message: "Choose a role", fieldErrors: fieldErrorsOf(parsed.error) };
  if (!can(viewer, "members.manage", { schoolId: parsed.data.schoolId })) return { ok: false, message: "Only the school's admins can invite people." };
  const invitation = await createInvitation(getDb(), { ...parsed.data, createdById: viewer.kind === "member" ? viewer.userId : null });
  return { ok: true, message: `Invitation link (valid until ${invitation.expiresAt.toISOString().slice(0, 10)}, usable once):`, secret: invitationUrl(await getPublicOrigin(), invitation.secret) };
}

export async function setRoleAction(formData: FormData): Promise<void> {
  const viewer = await getViewer();
  const schoolId = String(formData.get("schoolId") ?? "");
  const userId = String(formData.get("userId") ?? "");
  const roleValue = String(formData.get("role") ?? "");
  const page = `/schools/${encodeURIComponent(schoolId)}/members`;
  if (!can(viewer, "members.manage", { schoolId })) redirect(`${page}?error=forbidden`);
  const role = roleValue === "remove" ? ({ success: true, data: null } as const) : roleSchema.safeParse(roleValue);
  if (!role.success) redirect(`${page}?error=unknown-role`);
  try {
    await setMembershipRole(getDb(), { userId, schoolId, role: role.data, byUserId: viewer.kind === "member" ? viewer.userId : null });
  } catch (error) {
    if (error instanceof AccountError) redirect(`${page}?error=not-a-member`);
    throw error;
  }
  revalidatePath(page);
}
