import plexSansLatinRegular from '@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-400-normal.woff2?url';
import plexSansLatinSemibold from '@fontsource/ibm-plex-sans/files/ibm-plex-sans-latin-600-normal.woff2?url';
import plexSansGreekRegular from '@fontsource/ibm-plex-sans/files/ibm-plex-sans-greek-400-normal.woff2?url';
import monoLatinRegular from '@fontsource/jetbrains-mono/files/jetbrains-mono-latin-400-normal.woff2?url';
import monoLatinSemibold from '@fontsource/jetbrains-mono/files/jetbrains-mono-latin-600-normal.woff2?url';

/**
 * The font files every page draws its first screen with (Latin, regular and semibold, sans and mono), fetched
 * from the head: left to the style sheet, they are asked for only after the whole page has been parsed and laid
 * out, and each one arriving lays the whole page out and shapes its text again.
 */
export const FIRST_SCREEN_FONTS: readonly string[] = [plexSansLatinRegular, plexSansLatinSemibold, monoLatinRegular, monoLatinSemibold];

/** The Greek subset of the sans font, for pages whose text uses Greek letters (the sheet's results: σ, κ, Δ, ω). */
export const GREEK_FONT = plexSansGreekRegular;
