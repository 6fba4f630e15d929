/* cutplan page: the microphone capture's audio worklet.  It runs on the browser's audio thread,
   so every block of samples reaches the page in order and none is dropped or swapped, however
   busy the page's own thread is (a script processor on that thread delivers late blocks out of
   order on a loaded machine, which moved a measured pitch by cents or made it unreadable).  Each
   message carries the frame its first sample was taken at, so the page places the samples by
   frame, not by when the message arrived. */
class CutplanCapture extends AudioWorkletProcessor {
  constructor() {
    super();
    this.block = new Float32Array(4096);
    this.used = 0;
    this.start = 0;
  }

  process(inputs) {
    var channel = inputs[0] && inputs[0][0];
    if (channel) {
      if (this.used === 0) { this.start = currentFrame; }
      this.block.set(channel, this.used);
      this.used += channel.length;
      if (this.used + channel.length > this.block.length) {
        this.port.postMessage({frame: this.start, samples: this.block.slice(0, this.used)});
        this.used = 0;
      }
    }
    return true;
  }
}

registerProcessor("cutplan-capture", CutplanCapture);
