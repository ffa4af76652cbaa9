package dev.watcher.model;

import java.util.Map;

/**
 * The rules allow stopping the run's job because of this detection, under this gate. Whether it acts
 * (and not only records "would stop") is the action stage's decision: {@code --stop}, the gate, one stop
 * sequence per run, never while the run is marked converged.
 */
public record StopRequest(String run, String pattern, Severity severity, long iter, String reason,
        Map<String, Object> evidence, StopGate gate) {

    public StopRequest {
        evidence = evidence == null ? Map.of() : Map.copyOf(evidence);
        gate = gate == null ? StopGate.DEFAULT : gate;
    }
}
