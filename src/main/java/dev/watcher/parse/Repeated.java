package dev.watcher.parse;

import java.util.Locale;

/**
 * What to keep when one equation (or monitor) appears several times in one record, for example an energy
 * equation solved twice per iteration: the {@code first} value, the {@code last} one, or the largest
 * ({@code max}; a NaN counts as the largest, since it is the one an analyst must see).
 */
enum Repeated {
    FIRST, LAST, MAX;

    double combine(double kept, double next) {
        switch (this) {
            case FIRST:
                return kept;
            case LAST:
                return next;
            default:
                if (Double.isNaN(kept) || Double.isNaN(next)) {
                    return Double.NaN;
                }
                return Math.max(kept, next);
        }
    }

    String id() {
        return name().toLowerCase(Locale.ROOT);
    }

    static Repeated of(String s) {
        for (Repeated r : values()) {
            if (r.id().equals(s)) {
                return r;
            }
        }
        return null;
    }
}
