#!/usr/bin/env node
/**
 * Entry point of the ground-truth generator (`npm run gen -- --concepts N --seed S --out DIR
 * [--mappings-every K] [--gzip]`); the flags and the run live in cli.ts.
 */
import { main } from './cli.js';

process.exitCode = await main(process.argv);
