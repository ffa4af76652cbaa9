package dev.watcher.demo;

/**
 * How the demo solver interpolates a convected quantity to a control-volume face.
 *
 * <p>Both are textbook finite-volume schemes (Patankar 1980, "Numerical Heat Transfer and Fluid Flow",
 * ch. 5): first-order upwind keeps every neighbour coefficient positive at any cell Peclet number;
 * second-order central makes a neighbour coefficient negative once the cell Peclet number exceeds 2, which
 * is what makes it diverge on a coarse grid at high Reynolds number.
 */
public enum ConvectionScheme {
    /** First-order upwind: {@code a_nb = D + max(F_in, 0)}. */
    UPWIND("upwind-1"),
    /** Second-order central: {@code a_nb = D + F_in / 2}. */
    CENTRAL("central-2");

    private final String label;

    ConvectionScheme(String label) {
        this.label = label;
    }

    /** The short label the demo logs print. */
    public String label() {
        return label;
    }

    /** Coefficient of a neighbour across a face of diffusion conductance {@code d} and inflow {@code fin}. */
    double neighbour(double d, double fin) {
        return this == UPWIND ? d + Math.max(fin, 0.0) : d + 0.5 * fin;
    }
}
