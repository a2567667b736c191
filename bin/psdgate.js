#!/usr/bin/env node
// Thin shim: the CLI lives in the built library (npm run build, run by `npm ci` through `prepare`).
import "../dist/cli/bin.js";
