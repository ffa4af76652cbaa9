package dev.watcher.rules;

import dev.watcher.model.Severity;
import java.time.Duration;
import java.util.List;

/**
 * What the rules say about one pattern id. Every field may be null, meaning "not said here": the
 * detector's own severity and remedy stand, and the timing comes from {@link Delivery}. Layers (the default
 * file, a user's file that extends it, a per-run override) combine with {@link #over}.
 *
 * @param severity    replaces the detector's severity, or null
 * @param remedy      replaces the detector's remedy (a template, see {@link RemedyText}), or null
 * @param sendTo      channel names that get its notices, or null for the delivery default
 * @param hold        how long a condition must stay open before its first notice, or null
 * @param remindEvery interval of reminders while it stays open (zero: never), or null
 * @param onClear     send a resolved notice when it clears, or null
 * @param stop        whether it may stop the job, and the gate
 */
public record PatternRule(Severity severity, String remedy, List<String> sendTo, Duration hold,
        Duration remindEvery, Boolean onClear, StopRule stop) {

    public static final PatternRule UNSET = new PatternRule(null, null, null, null, null, null, StopRule.UNSET);

    public PatternRule {
        sendTo = sendTo == null ? null : List.copyOf(sendTo);
        stop = stop == null ? StopRule.UNSET : stop;
    }

    /** This rule with the fields {@code top} says laid over it. */
    public PatternRule over(PatternRule top) {
        if (top == null) {
            return this;
        }
        return new PatternRule(StopRule.pick(top.severity, severity), StopRule.pick(top.remedy, remedy),
                StopRule.pick(top.sendTo, sendTo), StopRule.pick(top.hold, hold),
                StopRule.pick(top.remindEvery, remindEvery), StopRule.pick(top.onClear, onClear),
                stop.over(top.stop));
    }
}
