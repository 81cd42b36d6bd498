#!/usr/bin/env node
// thin launcher: the compiled CLI lives in dist/ (built by `npm install` via the prepare script)
import { main } from '../dist/src/cli/main.js';

main();
