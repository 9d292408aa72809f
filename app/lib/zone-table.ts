// Kept so older imports of the threshold formatter keep working; the band tables live in band-table.ts.
export { formatThreshold } from "./band-table";
