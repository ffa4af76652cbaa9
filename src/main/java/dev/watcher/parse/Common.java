package dev.watcher.parse;

import java.util.List;
import java.util.Map;

/**
 * Settings every layout shares.
 *
 * @param name     the format's name
 * @param repeated what to keep when a name appears several times in one record
 * @param rank     only lines with this MPI rank prefix (and lines without a prefix) are read; -1: all ranks
 * @param families equation families declared by the format
 */
record Common(String name, Repeated repeated, int rank, Map<String, List<String>> families) {

    Common {
        families = Map.copyOf(families);
    }

    static Common named(String name) {
        return new Common(name, Repeated.LAST, LinePieces.NO_RANK, Map.of());
    }

    /** True when a line with this rank prefix should be read. */
    boolean readsRank(int lineRank) {
        return rank < 0 || lineRank < 0 || lineRank == rank;
    }
}
