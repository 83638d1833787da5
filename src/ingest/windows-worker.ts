/**
 * Entry of the worker thread that parses the later part of a windows file (windows-thread.ts).
 */
import { workerData } from "node:worker_threads";
import { WindowsParser } from "./windows.js";
import { BatchOut, runLaterPart, type WorkerInput, workerSend } from "./windows-thread.js";

const input = workerData as WorkerInput;
runLaterPart(
  (out) => new WindowsParser(input.path, input.card, input.settings, out, { start: input.start }),
  new BatchOut(workerSend(input.port, input.counter)),
);
