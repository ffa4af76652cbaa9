package dev.watcher.rules;

import java.time.Duration;
import java.util.List;

/**
 * How notices go out when a pattern's rule does not say otherwise.
 *
 * @param sendTo      channel names; {@link #ALL} stands for every declared channel
 * @param hold        how long a condition must stay open before its first notice
 * @param remindEvery reminder interval while a condition stays open; zero means never
 * @param onClear     send a resolved notice when a notified condition clears
 * @param gather      how long to wait after the first notice-worthy detection of a run, so related ones
 *                    join the same notice; zero sends at once
 * @param outrank     an open condition of higher severity holds back notices about lower ones of the run
 */
public record Delivery(List<String> sendTo, Duration hold, Duration remindEvery, boolean onClear,
        Duration gather, boolean outrank) {

    /** The word in {@code send-to} that stands for every declared channel. */
    public static final String ALL = "all";

    public static final Delivery BUILT_IN = new Delivery(List.of(ALL), Duration.ZERO, Duration.ZERO, true,
            Duration.ZERO, true);

    public Delivery {
        sendTo = sendTo == null ? List.of() : List.copyOf(sendTo);
        hold = hold == null ? Duration.ZERO : hold;
        remindEvery = remindEvery == null ? Duration.ZERO : remindEvery;
        gather = gather == null ? Duration.ZERO : gather;
    }

    Delivery withGather(Duration g) {
        return new Delivery(sendTo, hold, remindEvery, onClear, g, outrank);
    }
}
