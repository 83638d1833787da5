/**
 * Entry of the worker thread that parses parts of a windows file (windows-thread.ts).
 */
import { workerData } from "node:worker_threads";
import { BatchOut, parseParts, type WorkerInput, workerSend, workerTakeBack } from "./windows-thread.js";

const input = workerData as WorkerInput;
parseParts(
  input,
  new BatchOut(input.card, workerSend(input.port, input.counter), workerTakeBack(input.port)),
);
