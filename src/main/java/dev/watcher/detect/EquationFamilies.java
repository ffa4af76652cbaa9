package dev.watcher.detect;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

/**
 * Groups a run's equations into families by trade names (common practice, no published source): momentum
 * (x/y/z-momentum, mom-x, u/v/w, velocity components), turbulence (k, epsilon, omega, nut and similar),
 * volume fraction (vof, alpha), energy (energy, temperature, temp, h), continuity (continuity, cont,
 * pressure, p). A region prefix ({@code fluid/energy}) makes families per region ({@code fluid/energy}).
 * Declared families (from the format or the rules, {@link DetectSettings#families()}) replace the trade
 * names. Pure and stateless.
 */
final class EquationFamilies {

    static final String MOMENTUM = "momentum";
    static final String TURBULENCE = "turbulence";
    static final String VOLUME_FRACTION = "volume-fraction";
    static final String ENERGY = "energy";
    static final String CONTINUITY = "continuity";

    private static final Set<String> MOMENTUM_NAMES = Set.of("u", "v", "w", "ux", "uy", "uz", "u-x", "u-y", "u-z",
            "u_x", "u_y", "u_z", "x-velocity", "y-velocity", "z-velocity", "velocity-x", "velocity-y", "velocity-z");
    private static final Set<String> TURBULENCE_NAMES = Set.of("k", "epsilon", "eps", "omega", "nut", "nu-t",
            "nutilda", "nu-tilde", "nutilde", "tke", "sdr", "v2", "f", "kl", "intermittency", "retheta", "gamma-int");
    private static final Set<String> VOF_NAMES = Set.of("vof", "alpha", "volume-fraction", "vf", "phase-fraction");
    private static final Set<String> ENERGY_NAMES = Set.of("energy", "temperature", "temp", "t", "h", "enthalpy",
            "e", "heat");
    private static final Set<String> CONTINUITY_NAMES = Set.of("continuity", "cont", "p", "pressure", "p_rgh",
            "p-rgh", "mass", "pcorr", "p-corr", "pressure-correction");

    private EquationFamilies() {
    }

    /** The trade-name family of one equation (region prefix kept: {@code fluid/energy}), or null. */
    static String familyOf(String equation) {
        int slash = equation.lastIndexOf('/');
        String region = slash < 0 ? "" : equation.substring(0, slash + 1);
        String base = equation.substring(slash + 1).trim().toLowerCase(Locale.ROOT);
        String f = baseFamily(base);
        return f == null ? null : region + f;
    }

    private static String baseFamily(String b) {
        if (MOMENTUM_NAMES.contains(b) || b.contains("mom") || b.contains("veloc") || b.startsWith("vel-")
                || b.startsWith("vel_")) {
            return MOMENTUM;
        }
        if (VOF_NAMES.contains(b) || b.startsWith("alpha") || b.startsWith("vof") || b.contains("volume-frac")
                || b.contains("volume_frac")) {
            return VOLUME_FRACTION;
        }
        if (TURBULENCE_NAMES.contains(b) || b.contains("turb") || b.startsWith("epsilon") || b.startsWith("omega")) {
            return TURBULENCE;
        }
        if (ENERGY_NAMES.contains(b) || b.contains("energy") || b.startsWith("temp") || b.contains("enthalp")) {
            return ENERGY;
        }
        if (CONTINUITY_NAMES.contains(b) || b.startsWith("contin") || b.startsWith("pressure")) {
            return CONTINUITY;
        }
        return null;
    }

    /**
     * Families of {@code equations}, family name to members in the given order, keeping only families with
     * at least {@code minSize} members. Declared families, when any, replace the trade names (their members
     * that the run does not have are dropped). When no family qualifies, one family {@code all} of every
     * equation (when there are at least {@code minSize}), so "most of the run's equations" can be judged.
     */
    static Map<String, List<String>> of(List<String> equations, Map<String, List<String>> declared, int minSize) {
        Map<String, List<String>> out = new LinkedHashMap<>();
        if (declared != null && !declared.isEmpty()) {
            for (Map.Entry<String, List<String>> e : declared.entrySet()) {
                List<String> members = new ArrayList<>();
                for (String q : equations) {
                    if (e.getValue().contains(q)) {
                        members.add(q);
                    }
                }
                if (members.size() >= minSize) {
                    out.put(e.getKey(), members);
                }
            }
        } else {
            Map<String, List<String>> all = new LinkedHashMap<>();
            for (String q : equations) {
                String f = familyOf(q);
                if (f != null) {
                    all.computeIfAbsent(f, k -> new ArrayList<>()).add(q);
                }
            }
            all.forEach((k, v) -> {
                if (v.size() >= minSize) {
                    out.put(k, v);
                }
            });
        }
        if (out.isEmpty() && equations.size() >= minSize) {
            out.put("all", List.copyOf(equations));
        }
        return out;
    }
}
