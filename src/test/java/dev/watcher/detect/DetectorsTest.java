package dev.watcher.detect;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.junit.jupiter.api.Test;

class DetectorsTest {

    @Test
    void theStandardSetHoldsTheResidualDetectors() {
        List<Class<?>> kinds = Detectors.standard(DetectSettings.defaults()).stream()
                .<Class<?>>map(Object::getClass).toList();
        for (Class<?> c : List.of(NonFiniteDetector.class, ResidualLevelDetector.class,
                SingleEquationBlowupDetector.class, FamilyDivergenceDetector.class, StalledOscillationDetector.class)) {
            assertTrue(kinds.contains(c), c.getSimpleName());
        }
    }

    @Test
    void everyParameterReadIsNamedByItsPatternId() {
        DetectSettings s = DetectSettings.defaults();
        Detectors.standard(s);
        for (String key : s.used().keySet()) {
            String pattern = key.substring(0, key.indexOf('.'));
            assertTrue(dev.watcher.model.Patterns.isKnown(pattern), key);
            assertTrue(key.substring(key.indexOf('.') + 1).matches("[a-z][a-z0-9_]*"), key);
        }
    }
}
