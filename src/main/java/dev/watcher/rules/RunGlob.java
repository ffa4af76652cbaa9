package dev.watcher.rules;

/** Run-name matching with {@code *} (any text) and {@code ?} (one character); everything else literal. */
final class RunGlob {

    private RunGlob() {
    }

    static boolean matches(String glob, String run) {
        return match(glob, 0, run, 0);
    }

    private static boolean match(String g, int gi, String s, int si) {
        while (gi < g.length()) {
            char c = g.charAt(gi);
            if (c == '*') {
                for (int k = si; k <= s.length(); k++) {
                    if (match(g, gi + 1, s, k)) {
                        return true;
                    }
                }
                return false;
            }
            if (si >= s.length() || (c != '?' && c != s.charAt(si))) {
                return false;
            }
            gi++;
            si++;
        }
        return si == s.length();
    }
}
