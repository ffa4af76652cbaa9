package dev.watcher.demo;

/**
 * The numerical set-up of one cavity run: grid, physics, relaxation, scheme and time stepping.
 *
 * @param cells           cells per side of the unit square (even; 32 cells = 33 x 33 grid lines)
 * @param reynolds        Reynolds number built on the lid speed and the cavity side (lid speed 1, side 1)
 * @param relaxMomentum   under-relaxation factor of the two momentum equations (0, 1]
 * @param relaxPressure   under-relaxation factor of the pressure update (0, 1]
 * @param relaxEnergy     under-relaxation factor of the energy equation (0, 1]
 * @param scheme          convection scheme of momentum and energy
 * @param energy          whether the passive energy equation ({@code temp}) is solved: hot lid at 1, cold
 *                        floor at 0, adiabatic side walls
 * @param prandtl         Prandtl number of the energy equation
 * @param timeStep        backward-Euler time step; 0 for a steady run
 * @param innerIterations pressure-correction iterations per time step (unsteady only)
 * @param badCellSource   0, or the coefficient {@code Sp} (per unit volume) of a heat source linearised as
 *                        {@code S = Sp * T} with the wrong sign in one cell of the energy equation (a defect
 *                        the way a degenerate cell gives one, so that only {@code temp} blows up)
 */
public record SolverSettings(int cells, double reynolds, double relaxMomentum, double relaxPressure,
        double relaxEnergy, ConvectionScheme scheme, boolean energy, double prandtl, double timeStep,
        int innerIterations, double badCellSource) {

    public SolverSettings {
        if (cells < 4 || cells % 2 != 0) {
            throw new IllegalArgumentException("cells must be even and at least 4: " + cells);
        }
        if (!(reynolds > 0)) {
            throw new IllegalArgumentException("reynolds must be positive: " + reynolds);
        }
        checkRelax("relaxMomentum", relaxMomentum);
        checkRelax("relaxPressure", relaxPressure);
        checkRelax("relaxEnergy", relaxEnergy);
        if (scheme == null) {
            throw new IllegalArgumentException("scheme is required");
        }
        if (timeStep < 0 || (timeStep > 0 && innerIterations < 1)) {
            throw new IllegalArgumentException("unsteady runs need timeStep > 0 and innerIterations >= 1");
        }
    }

    private static void checkRelax(String name, double a) {
        if (!(a > 0 && a <= 1)) {
            throw new IllegalArgumentException(name + " must be in (0, 1]: " + a);
        }
    }

    /** A steady run without energy equation and without defect. */
    public static SolverSettings steady(int cells, double reynolds, double relaxMomentum, double relaxPressure,
            ConvectionScheme scheme) {
        return new SolverSettings(cells, reynolds, relaxMomentum, relaxPressure, 0.9, scheme, false, 0.71, 0, 0,
                0);
    }

    public boolean unsteady() {
        return timeStep > 0;
    }

    public SolverSettings withEnergy(double relax, double prandtlNumber) {
        return new SolverSettings(cells, reynolds, relaxMomentum, relaxPressure, relax, scheme, true, prandtlNumber,
                timeStep, innerIterations, badCellSource);
    }

    public SolverSettings withRelaxation(double momentum, double pressure) {
        return new SolverSettings(cells, reynolds, momentum, pressure, relaxEnergy, scheme, energy, prandtl,
                timeStep, innerIterations, badCellSource);
    }

    public SolverSettings withScheme(ConvectionScheme s) {
        return new SolverSettings(cells, reynolds, relaxMomentum, relaxPressure, relaxEnergy, s, energy, prandtl,
                timeStep, innerIterations, badCellSource);
    }

    public SolverSettings withTimeStepping(double dt, int inner) {
        return new SolverSettings(cells, reynolds, relaxMomentum, relaxPressure, relaxEnergy, scheme, energy,
                prandtl, dt, inner, badCellSource);
    }

    public SolverSettings withBadCell(double sourceCoefficient) {
        return new SolverSettings(cells, reynolds, relaxMomentum, relaxPressure, relaxEnergy, scheme, energy,
                prandtl, timeStep, innerIterations, sourceCoefficient);
    }
}
