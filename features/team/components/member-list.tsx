"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import type { Role } from "@/lib/auth/roles";
import { FormMessage } from "@/lib/ui/field";
import type { Member, TeamActionState } from "@/features/team/schemas";

type Props = {
  members: Member[];
  currentUserId: string;
  canManage: boolean;
  changeRole: (userId: string, role: Role) => Promise<TeamActionState>;
  remove: (userId: string) => Promise<TeamActionState>;
};

/** The group's members; a lead changes roles and removes people here. */
export function MemberList({ members, currentUserId, canManage, changeRole, remove }: Props) {
  const [message, setMessage] = useState<TeamActionState | null>(null);
  const [pending, startTransition] = useTransition();
  const router = useRouter();

  function run(work: () => Promise<TeamActionState>) {
    startTransition(async () => {
      const result = await work();
      setMessage(result);
      router.refresh();
    });
  }

  return (
    <div className="space-y-3">
      {message ? <FormMessage tone={message.ok ? "info" : "error"}>{message.message}</FormMessage> : null}
      <div className="card overflow-x-auto">
        <table className="w-full text-left text-sm">
          <caption className="sr-only">Members of the group</caption>
          <thead className="border-b border-line text-xs text-ink-muted">
            <tr>
              <th scope="col" className="px-4 py-2 font-medium">Name</th>
              <th scope="col" className="px-4 py-2 font-medium">E-mail</th>
              <th scope="col" className="px-4 py-2 font-medium">Role</th>
              {canManage ? <th scope="col" className="px-4 py-2 font-medium"><span className="sr-only">Actions</span></th> : null}
            </tr>
          </thead>
          <tbody>
            {members.map((m) => (
              <tr key={m.userId} className="border-b border-line last:border-0">
                <td className="px-4 py-2">
                  {m.displayName}
                  {m.userId === currentUserId ? <span className="ml-2 text-xs text-ink-muted">(you)</span> : null}
                </td>
                <td className="px-4 py-2 font-mono text-xs">{m.email}</td>
                <td className="px-4 py-2">
                  {canManage ? (
                    <select
                      aria-label={`Role of ${m.displayName}`}
                      className="field-input w-32 py-1"
                      defaultValue={m.role}
                      disabled={pending}
                      onChange={(e) => {
                        const role = e.target.value as Role;
                        run(() => changeRole(m.userId, role));
                      }}
                    >
                      <option value="lead">lead</option>
                      <option value="analyst">analyst</option>
                      <option value="viewer">viewer</option>
                    </select>
                  ) : (
                    m.role
                  )}
                </td>
                {canManage ? (
                  <td className="px-4 py-2 text-right">
                    <button
                      type="button"
                      className="btn-quiet py-1 text-red-700 dark:text-red-300"
                      disabled={pending}
                      onClick={() => {
                        if (window.confirm(`Remove ${m.displayName} from the group?`)) run(() => remove(m.userId));
                      }}
                    >
                      Remove
                    </button>
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
