package org.stackwright.repair;

/** Kinds of defective camera pixels. */
public enum PixelDefect {
    /** much brighter than it should be (high dark signal), still responds to light */
    HOT,
    /** reads (near) the dark level whatever the light */
    DEAD,
    /** reads one fixed value whatever the light (no temporal noise), not at the dark level */
    STUCK
}
