package org.stackwright.spark;

import java.io.Serializable;
import java.util.Map;

import org.stackwright.blocks.BlockPlan;
import org.stackwright.blocks.Globals;

/**
 * Everything a node needs to process any block of a run, sent with every task: the operation, its settings with
 * the global choices filled in, where the inputs and the staging folder are (paths every node sees), and the plan.
 *
 * @param id a name of this run, unique on the cluster (keys the per-node cache of prepared processors)
 * @param operation the operation's command-line name
 * @param settings setting key to text, given settings with the global choices put in (no image paths)
 * @param smallImages key to path of the inputs every block loads whole (a PSF)
 * @param streamedInputs key to path of the inputs read by random access (TIFF file or folder of planes)
 * @param globals the global step's settings and numbers (its record stays on the driver)
 * @param plan the blocks
 * @param staging the staging folder (on the shared file system)
 * @param outputs streamed output key to bits per sample
 * @param failOnce a block whose first attempt is made to fail after writing part of its output (tests), or -1
 */
record TaskSpec(String id, String operation, Map<String, String> settings, Map<String, String> smallImages,
        Map<String, String> streamedInputs, Globals globals, BlockPlan plan, String staging,
        Map<String, Integer> outputs, int failOnce) implements Serializable {
}
