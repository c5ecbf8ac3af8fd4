import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { can } from "@/lib/auth/permissions";
import { listSchoolMembers } from "@/lib/query/accounts";
import { getViewer } from "@/app/_lib/viewer";
import { setRoleAction } from "@/app/account/actions";
import { InviteForm } from "@/app/account/_components/account-forms";

export const metadata: Metadata = { title: "Members" };

/** Refusals a members form redirects back with (codes, so a link cannot put any text on the page). */
const ERRORS: Record<string, string> = {
  forbidden: "Only this school's admins and the program admins manage members.",
  "unknown-role": "Choose a role: reader, contributor or school admin.",
  "not-a-member": "That person is not a member of this school; invite them with a link instead.",
};

export default async function SchoolMembersPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<{ error?: string | string[] }> }) {
  const [{ id }, { error }] = await Promise.all([params, searchParams]);
  const viewer = await getViewer();
  if (!can(viewer, "members.manage", { schoolId: id })) {
    return (
      <>
        <h1>Members</h1>
        <p className="notice notice-error" role="alert">{viewer.kind === "anonymous" ? "Sign in first." : "Only this school's admins and the program admins manage members."}</p>
      </>
    );
  }
  const school = await listSchoolMembers(id);
  if (!school) notFound();
  return (
    <>
      <h1>{school.name}: members</h1>
      {typeof error === "string" && ERRORS[error] ? <p className="notice notice-error" role="alert">{ERRORS[error]}</p> : null}
      {school.memberships.length === 0 ? <p className="muted">No members yet: make an invitation link below.</p> : (
        <div className="table-wrap">
          <table>
            <thead><tr><th scope="col">Name</th><th scope="col">Email</th><th scope="col">Role</th></tr></thead>
            <tbody>
              {school.memberships.map((m) => (
                <tr key={m.user.id}>
                  <td>{m.user.displayName}</td>
                  <td>{m.user.email}</td>
                  <td>
                    <form action={setRoleAction} className="actions">
                      <input type="hidden" name="schoolId" value={school.id} />
                      <input type="hidden" name="userId" value={m.user.id} />
                      <label>
                        <span className="visually-hidden">Role of {m.user.displayName}</span>
                        <select name="role" defaultValue={m.role}>
                          <option value="reader">reader</option>
                          <option value="contributor">contributor</option>
                          <option value="school-admin">school admin</option>
                          <option value="remove">remove from school</option>
                        </select>
                      </label>
                      <button className="button button-secondary" type="submit">Save</button>
                    </form>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <InviteForm schoolId={school.id} />
    </>
  );
}
