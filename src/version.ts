/** The tool's name and version, as written into every report. */
export const NAME = 'termdrift';
export const VERSION = '0.1.0';
