/** Engine version, written into every run record. A test keeps it equal to package.json's. */
export const ENGINE_VERSION = '0.1.0';
