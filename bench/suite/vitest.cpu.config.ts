/** The suite's own config plus a per-file CPU record (bench/suite/cpuPerFile.ts). */
import { defineConfig, mergeConfig } from 'vitest/config';
import base from '../../vitest.config.js';

export default mergeConfig(base, defineConfig({ test: { setupFiles: ['./bench/suite/cpuPerFile.ts'] } }));
