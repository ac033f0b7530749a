/*
 * One outbox delivery round in a process of its own, for the kill test: the parent SIGKILLs
 * it at chosen points of the SMTP conversation and starts it again.
 *
 *   node --conditions=react-server --import tsx tests/faults/outbox-deliver.ts <row ids, comma-separated> <lease ms>
 */
import { closeDb } from "@/lib/db/knex";
import { deliverDue } from "@/lib/mail/outbox";

async function main(): Promise<void> {
  const ids = (process.argv[2] ?? "").split(",").map(Number);
  const leaseMs = Number(process.argv[3]);
  if (!ids.every((id) => Number.isInteger(id) && id > 0) || !Number.isFinite(leaseMs)) {
    throw new Error("usage: outbox-deliver.ts <row ids, comma-separated> <lease ms>");
  }
  const report = await deliverDue({ filter: { ids }, leaseMs });
  console.log(JSON.stringify(report));
  await closeDb();
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
