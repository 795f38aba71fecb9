#!/usr/bin/env node
// The `chernel` command: the compiled kernel CLI (build with `npm run build`).
import '../dist/kernel/cli.js';
