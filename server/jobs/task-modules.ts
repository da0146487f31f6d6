/**
 * The modules that register task kinds. Every worker entry (pool thread, queue worker process) imports
 * this file before taking work, so a kind means the same thing wherever it runs. Add a module here when
 * it registers a new kind.
 */
import './evaluation-tasks.ts';
import './probe-task.ts';
