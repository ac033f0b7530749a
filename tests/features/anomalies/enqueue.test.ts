import { expect, test } from "vitest";
import { getJob } from "@/lib/jobs/queue";
import { BASELINE_REACH_DAYS, enqueueAnomalyDetection } from "@/lib/anomalies/server/enqueue";
import { createSiteFor, createUserWithGroup } from "@/tests/support/db";

test("a queued screen covers changed dates plus the baseline's reach, and later requests widen it", async () => {
  const { group } = await createUserWithGroup();
  const site = await createSiteFor(group.id);
  const id = await enqueueAnomalyDetection(site.id, "2023-05-20", "2023-05-31");
  expect(BASELINE_REACH_DAYS).toBe(12);
  expect((await getJob(id))?.payload).toEqual({ from: "2023-05-08", to: "2023-06-12" });
  expect(await enqueueAnomalyDetection(site.id, "2023-07-01", "2023-07-02")).toBe(id);
  expect((await getJob(id))?.payload).toEqual({ from: "2023-05-08", to: "2023-07-14" });
  expect(await enqueueAnomalyDetection(site.id, null, "2023-01-01")).toBe(id);
  const job = await getJob(id);
  expect(job).toMatchObject({
    kind: "anomalies",
    groupId: group.id,
    siteId: site.id,
    payload: { from: null, to: "2023-07-14" },
  });
  await expect(enqueueAnomalyDetection(999_999_999, null, null)).rejects.toThrow(/does not exist/);
});
