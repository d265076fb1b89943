/** A failure that will not go better on retry (a file ffmpeg cannot decode): the job is failed at once. */
export class FinalJobError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FinalJobError';
  }
}

/** The job is no longer ours: its lease was taken over, or it was deleted with its clip. Stop without a trace. */
export class LeaseLostError extends Error {
  constructor(jobId: number) {
    super(`job ${jobId} is no longer held by this worker`);
    this.name = 'LeaseLostError';
  }
}

/** The worker is stopping: the job is given back to the queue as it is. */
export class ShutdownError extends Error {
  constructor() {
    super('the worker is stopping');
    this.name = 'ShutdownError';
  }
}
