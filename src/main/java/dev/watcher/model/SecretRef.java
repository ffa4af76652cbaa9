package dev.watcher.model;

/**
 * Where a secret (or a URL that carries a token) comes from: exactly one of a literal value (only for
 * values that are not secret, such as a plain URL in a rules file), a file path, or an environment
 * variable name. Resolved by the stage that uses it (the notifier), never logged.
 */
public record SecretRef(String literal, String file, String env) {

    public static SecretRef ofLiteral(String v) {
        return new SecretRef(v, null, null);
    }

    public static SecretRef ofFile(String path) {
        return new SecretRef(null, path, null);
    }

    public static SecretRef ofEnv(String name) {
        return new SecretRef(null, null, name);
    }

    /** Safe to print: says where the value comes from, never the value. */
    public String describe() {
        if (file != null) {
            return "file " + file;
        }
        if (env != null) {
            return "environment variable " + env;
        }
        return "inline value";
    }
}
