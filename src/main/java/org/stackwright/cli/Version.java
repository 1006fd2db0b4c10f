package org.stackwright.cli;

/** The suite's version, from the jar manifest when packaged. */
public final class Version {

    private Version() {
    }

    /** @return the version, or "development" when run from classes */
    public static String get() {
        String v = Version.class.getPackage().getImplementationVersion();
        return v == null ? "development" : v;
    }
}
