/** keel's version; a test holds it equal to package.json's. */
export const KEEL_VERSION = "0.1.0";
