/**
 * The modules that register task kinds (registerTask). Every worker entry (pool thread, queue worker
 * process) imports this list before taking work, so a kind means the same handler on every thread and
 * machine. Add a module here when it registers a new kind.
 */
import '../analysis/ensemble/chunks.ts';
import './evaluation-tasks.ts';
import './probe-task.ts';
import '../analysis/landscape/run-tasks.ts';
import '../analysis/landscape/ensemble.ts';
