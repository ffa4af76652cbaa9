package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

class EquationFamiliesTest {

    @Test
    void tradeNamesMapToFamilies() {
        for (String m : List.of("x-momentum", "Y-Momentum", "mom-x", "u", "w", "velocity-x", "Ux")) {
            assertEquals("momentum", EquationFamilies.familyOf(m), m);
        }
        for (String t : List.of("k", "epsilon", "omega", "nut", "tke")) {
            assertEquals("turbulence", EquationFamilies.familyOf(t), t);
        }
        for (String v : List.of("vof", "alpha.water", "alpha1")) {
            assertEquals("volume-fraction", EquationFamilies.familyOf(v), v);
        }
        for (String e : List.of("energy", "temperature", "temp", "h")) {
            assertEquals("energy", EquationFamilies.familyOf(e), e);
        }
        for (String c : List.of("continuity", "cont", "p", "pressure", "p_rgh")) {
            assertEquals("continuity", EquationFamilies.familyOf(c), c);
        }
        assertNull(EquationFamilies.familyOf("species-o2"));
    }

    @Test
    void regionsFormFamiliesOfTheirOwn() {
        Map<String, List<String>> f = EquationFamilies.of(
                List.of("fluid/mom-x", "fluid/mom-y", "fluid/energy", "solid/energy", "shell/energy"), Map.of(), 2);
        assertEquals(Map.of("fluid/momentum", List.of("fluid/mom-x", "fluid/mom-y")), f);
    }

    @Test
    void namesWithoutFamiliesMakeOneFamilyOfTheWholeRun() {
        Map<String, List<String>> f = EquationFamilies.of(List.of("q1", "q2", "q3"), Map.of(), 2);
        assertEquals(Map.of("all", List.of("q1", "q2", "q3")), f);
    }

    @Test
    void declaredFamiliesReplaceTradeNames() {
        Map<String, List<String>> f = EquationFamilies.of(List.of("mom-x", "mom-y", "a", "b"),
                Map.of("pair", List.of("a", "b", "absent")), 2);
        assertEquals(Map.of("pair", List.of("a", "b")), f);
    }
}
