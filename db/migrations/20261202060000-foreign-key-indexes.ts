import type { QueryInterface } from "sequelize";

/**
 * An index led by every foreign-key column that had none: deleting a parent row otherwise scans the whole child
 * table for its ON DELETE action (removing one threshold would visit every placed step of every athlete).
 * tests/integration/indexes.test.ts fails for any foreign key added later without an index.
 */
const COLUMNS: [table: string, column: string][] = [
  ["assignments", "assigned_by"],
  ["field_tests", "created_by"],
  ["field_tests", "threshold_id"],
  ["field_tests", "upload_id"],
  ["field_tests", "undone_by"],
  ["invitations", "accepted_user_id"],
  ["listings", "coach_id"],
  ["listings", "plan_id"],
  ["orders", "assignment_id"],
  ["password_resets", "user_id"],
  ["payment_events", "order_id"],
  ["plan_items", "recurrence_id"],
  ["plan_recurrences", "plan_id"],
  ["plan_recurrences", "source_session_id"],
  ["rescale_reports", "created_by"],
  ["rescale_reports", "field_test_id"],
  ["rescale_reports", "confirmed_by"],
  ["scheduled_blocks", "threshold_id"],
  ["session_comments", "author_id"],
  ["scheduled_sessions", "plan_item_id"],
  ["thresholds", "created_by"],
  ["uploads", "uploaded_by"],
];

const name = (table: string, column: string) => `${table}_${column}_fk_idx`;

export async function up({ context: qi }: { context: QueryInterface }) {
  for (const [table, column] of COLUMNS) await qi.addIndex(table, [column], { name: name(table, column) });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const [table, column] of COLUMNS) await qi.removeIndex(table, name(table, column));
}
