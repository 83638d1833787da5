/**
 * Entry of the worker thread that parses parts of a windows file (windows-thread.ts).
 */
import { workerData } from "node:worker_threads";
import { BatchOut, parseParts, type WorkerInput, workerSend } from "./windows-thread.js";

const input = workerData as WorkerInput;
parseParts(input, new BatchOut(workerSend(input.port, input.counter)));
