#!/usr/bin/env node
console.log('kinpath-engine');
