package dev.watcher.model;

import java.util.Locale;

/** Why a notice goes out: a condition opened, is still open (reminder), or cleared. */
public enum NoticeKind {
    OPENED, REMINDER, RESOLVED, INFO;

    public String id() {
        return name().toLowerCase(Locale.ROOT);
    }
}
