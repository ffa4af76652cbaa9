/**
 * The project's own small CFD solver, so that demos and tests watch real iterative numerics.
 *
 * <pre>
 *  Scenario (named set-up) --> ScenarioRun --> CavitySolver (SIMPLE, staggered grid, lid-driven cavity)
 *        |                          |
 *        |                          +--> Histories.run(name, n)      records in memory (tests, detectors)
 *        |                          +--> DemoSolverMain (child)      LogWriter --> growing log file
 *        +--> TestLogGen --> test-logs/*.log, *.jsonl (regenerable examples)
 * </pre>
 *
 * <p>Depends only on {@code model}. Performs file I/O only in {@link dev.watcher.demo.DemoSolverMain} and
 * {@link dev.watcher.demo.TestLogGen}; {@link dev.watcher.demo.Histories} is pure and deterministic.
 */
package dev.watcher.demo;
