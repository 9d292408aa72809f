// Entry of the ride-file worker threads. The app runs its TypeScript through tsx (scripts/start.ts), and a worker
// starts with a fresh module loader, so it registers tsx itself before loading the task.
import { register } from "tsx/esm/api";

register();
const task = await import("./activity-task.ts");

export default task.default;
