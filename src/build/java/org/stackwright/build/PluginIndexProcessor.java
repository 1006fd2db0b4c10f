package org.stackwright.build;

import javax.annotation.processing.SupportedAnnotationTypes;
import javax.lang.model.SourceVersion;

import org.scijava.annotations.AnnotationProcessor;

/**
 * Build-time only (never in a jar): SciJava's annotation processor, which writes the index of {@code @Plugin}
 * classes (META-INF/json/org.scijava.plugin.Plugin) that lets SciJava find our commands. It declares Java 8 as
 * the newest source it supports, so javac warns on every build with {@code --release 17}; it only reads
 * annotations, which Java 17 sources carry the same way, so this subclass declares the compiler's own version.
 * The pom compiles it first and names it as the one processor of the main compilation.
 */
@SupportedAnnotationTypes("*")
public class PluginIndexProcessor extends AnnotationProcessor {

    @Override
    public SourceVersion getSupportedSourceVersion() {
        return SourceVersion.latestSupported();
    }
}
