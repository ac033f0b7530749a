import { describe, expect, test } from "vitest";
import { switchGroupAction } from "@/features/shell/server/actions";
import { getActiveGroup } from "@/lib/auth/session";
import { addMember, clientFor, createUserWithGroup } from "@/tests/support/db";
import { formData } from "@/tests/support/next";

describe("switchGroupAction", () => {
  test("switches to a group the person belongs to, and not to one they do not", async () => {
    const { user, group } = await createUserWithGroup({ role: "viewer" });
    const client = await clientFor(user, { groupId: group.id });
    const second = await createUserWithGroup();
    await addMember(user.id, second.group.id, "lead");
    const foreign = await createUserWithGroup();

    expect(await client.run(() => switchGroupAction(formData({ groupId: second.group.id })))).toEqual({
      kind: "redirect",
      location: "/sites",
    });
    expect((await client.call(() => getActiveGroup()))?.groupId).toBe(second.group.id);

    await client.run(() => switchGroupAction(formData({ groupId: foreign.group.id })));
    expect((await client.call(() => getActiveGroup()))?.groupId).toBe(second.group.id);
  });
});
