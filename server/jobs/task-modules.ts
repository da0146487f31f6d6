/**
 * The modules that register task kinds (registerTask). A worker entry imports this list before taking work,
 * so a task kind means the same handler on every thread and machine.
 */
import '../analysis/ensemble/chunks.ts';
