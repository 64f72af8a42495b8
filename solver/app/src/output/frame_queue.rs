//! Writes `.vtu` frames on a thread of their own, in the order they were
//! queued, while the solver goes on with the next increment: encoding and
//! compressing a frame costs about as much as a small seal's increment (the
//! face-seal example: 0.08 s of 0.47 s for 25 frames, measured), and on a
//! small model the solver keeps one core busy at a time.
//!
//! Each frame is written atomically, then the `.pvd` collection that lists
//! it, so the collection never names a frame that is not on disk. At most
//! [`QUEUED_FRAMES`] wait to be written (the solver waits beyond that, so a
//! slow disk cannot fill memory with frames). [`FrameQueue::drain`] waits
//! for every queued frame and reports the first failure.

use std::path::PathBuf;
use std::sync::mpsc::{sync_channel, Receiver, SyncSender};
use std::sync::Arc;
use std::thread::JoinHandle;

use olli_mesh::Mesh;

use super::atomic::write_atomic;
use super::vtu::{write_vtu, Field};

/// Frames that may wait to be written while the solver goes on.
pub const QUEUED_FRAMES: usize = 2;

/// One frame to write: its `.vtu` file and fields, then the `.pvd`
/// collection text that lists it.
pub struct FrameJob {
    /// Path of the `.vtu` file.
    pub vtu: PathBuf,
    /// Title line of the frame.
    pub title: String,
    /// Point fields.
    pub point: Vec<Field>,
    /// Cell fields.
    pub cell: Vec<Field>,
    /// Path of the `.pvd` collection.
    pub pvd: PathBuf,
    /// The collection's text, this frame included.
    pub pvd_text: String,
}

/// The running writer: where frames are sent, and its thread (which
/// returns the first failure).
struct Worker {
    sender: SyncSender<FrameJob>,
    thread: JoinHandle<Result<(), String>>,
}

/// A background writer of frames over one mesh.
pub struct FrameQueue {
    mesh: Arc<Mesh>,
    worker: Option<Worker>,
}

impl FrameQueue {
    /// A queue writing frames of `mesh`; its thread starts with the first frame.
    pub fn new(mesh: Mesh) -> Self {
        FrameQueue { mesh: Arc::new(mesh), worker: None }
    }

    /// Queues `job`, waiting while [`QUEUED_FRAMES`] are queued already.
    /// Fails with the first failure of an earlier frame (this one is then
    /// not written, and no later one).
    pub fn push(&mut self, job: FrameJob) -> Result<(), String> {
        if self.worker.is_none() {
            let (sender, receiver) = sync_channel(QUEUED_FRAMES);
            let mesh = Arc::clone(&self.mesh);
            let handle = std::thread::Builder::new()
                .name("olli-frames".into())
                .spawn(move || write_frames(&mesh, receiver))
                .map_err(|e| format!("cannot start the frame writer: {e}"))?;
            self.worker = Some(Worker { sender, thread: handle });
        }
        let worker = self.worker.as_ref().expect("started above");
        if worker.sender.send(job).is_err() {
            // The writer stopped at a failure: report it.
            return self.drain().and(Err("the frame writer stopped".into()));
        }
        Ok(())
    }

    /// Waits until every queued frame is written; the first failure, if any.
    /// A later [`FrameQueue::push`] starts the writer again.
    pub fn drain(&mut self) -> Result<(), String> {
        let Some(Worker { sender, thread }) = self.worker.take() else { return Ok(()) };
        drop(sender);
        thread.join().unwrap_or_else(|_| Err("the frame writer failed".into()))
    }
}

impl Drop for FrameQueue {
    /// A run that ends early still gets every queued frame on disk.
    fn drop(&mut self) {
        let _ = self.drain();
    }
}

/// The writer thread: frames in order until the queue closes or one fails.
fn write_frames(mesh: &Mesh, receiver: Receiver<FrameJob>) -> Result<(), String> {
    for job in receiver {
        let name = job.vtu.display().to_string();
        write_vtu(&job.vtu, &job.title, mesh, job.point, job.cell).map_err(|e| format!("{name}: {e}"))?;
        write_atomic(&job.pvd, job.pvd_text.as_bytes()).map_err(|e| format!("{}: {e}", job.pvd.display()))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square() -> Mesh {
        olli_mesh::generate::rectangle(&olli_mesh::generate::RectangleParams { size: [1.0, 1.0], divisions: [2, 2], ..Default::default() })
            .expect("mesh")
    }

    fn job(dir: &std::path::Path, k: usize, n: usize) -> FrameJob {
        FrameJob {
            vtu: dir.join(format!("f_{k:04}.vtu")),
            title: format!("frame {k}"),
            point: vec![Field::new("pressure", 1, vec![k as f64; n])],
            cell: Vec::new(),
            pvd: dir.join("f.pvd"),
            pvd_text: format!("frames 1..{k}\n"),
        }
    }

    // Every queued frame is on disk after drain, and the collection is the
    // last one queued (ordering of the writer, no reference value).
    #[test]
    fn queued_frames_are_all_written_in_order() {
        let dir = std::env::temp_dir().join(format!("olli-frames-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let mesh = square();
        let n = mesh.node_count();
        let mut queue = FrameQueue::new(mesh);
        for k in 1..=5 {
            queue.push(job(&dir, k, n)).unwrap();
        }
        queue.drain().unwrap();
        for k in 1..=5 {
            let text = std::fs::read_to_string(dir.join(format!("f_{k:04}.vtu"))).unwrap();
            assert!(text.contains("Name=\"pressure\"") && text.trim_end().ends_with("</VTKFile>"), "frame {k}");
        }
        assert_eq!(std::fs::read_to_string(dir.join("f.pvd")).unwrap(), "frames 1..5\n");
        std::fs::remove_dir_all(&dir).unwrap();
    }

    // A frame that cannot be written (its folder is missing) is reported by
    // drain, and the writer starts again for the next frame.
    #[test]
    fn a_failed_frame_is_reported() {
        let mesh = square();
        let n = mesh.node_count();
        let mut queue = FrameQueue::new(mesh);
        let missing = std::env::temp_dir().join(format!("olli-frames-missing-{}", std::process::id())).join("nowhere");
        queue.push(job(&missing, 1, n)).unwrap();
        let err = queue.drain().unwrap_err();
        assert!(err.contains("f_0001.vtu"), "{err}");
        let dir = std::env::temp_dir().join(format!("olli-frames-again-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        queue.push(job(&dir, 2, n)).unwrap();
        queue.drain().unwrap();
        assert!(dir.join("f_0002.vtu").exists());
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
