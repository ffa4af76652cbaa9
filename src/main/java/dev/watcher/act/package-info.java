/**
 * The act stage: stops a run's job when the rules allow it, the daemon runs with {@code --stop} and the gates
 * pass; otherwise records what it would have done.
 *
 * <pre>
 *  --job spec --JobRef.parse--&gt; JobRef --JobControl.attach--&gt; JobControl (pid | slurm | pbs)
 *
 *  rules: StopRequest --&gt; StopCoordinator.request   (run's thread, never blocks)
 *  records/segments   --&gt; recordSeen / segment / converged / cleared
 *                            | gates pass (persistence, run age, segment grace, once per run, not converged)
 *                            v  own thread
 *       requested -&gt; [stop file] -&gt; [user command] -&gt; JobControl.stop: graceful signal, grace, forced
 *                            |
 *                            v
 *                  action events (EventSink): would-stop, requested, signalled, done, refused, failed
 * </pre>
 *
 * Owns processes and files (child processes for scheduler commands, the stop file); depends on the model
 * only. Local processes are known by pid, start time and command, never by pid alone.
 */
package dev.watcher.act;
