//! The page's Web Workers: each instantiates the page's own module, which
//! the boot script compiled once and left in `globalThis.ternModule`, from
//! the script at `globalThis.ternWorkerUrl` (a module worker file of the
//! served edition; the one-file edition's inline source as a Blob URL, a
//! classic worker as `globalThis.ternWorkerType` says). The worker's code
//! (scripts/finish-page.mjs, `workerBody`) answers two kinds of message:
//! chunks of a simulation check and a sample-size search.
//!
//! Invariant: a worker's handlers live as long as its `Spawned`; whoever
//! ends a worker from inside one of its handlers keeps the `Spawned` until
//! a later event (dropping a closure while it runs would trap).

use wasm_bindgen::JsCast;
use wasm_bindgen::prelude::*;
use web_sys::{MessageEvent, Worker, WorkerOptions, WorkerType};

/// A started worker and its handlers.
pub struct Spawned {
    pub worker: Worker,
    _on_message: Closure<dyn FnMut(MessageEvent)>,
    _on_error: Closure<dyn FnMut(web_sys::Event)>,
}

impl Spawned {
    /// Post a message; false when the browser refused it.
    pub fn post(&self, msg: &JsValue) -> bool {
        self.worker.post_message(msg).is_ok()
    }

    pub fn stop(&self) {
        self.worker.terminate();
    }
}

/// Start a worker and post it the compiled module. `on_message` gets each
/// message's data; `on_error` why the worker stopped. Err: why none could
/// be started, in words.
pub fn spawn(on_message: impl FnMut(JsValue) + 'static, on_error: impl FnMut(String) + 'static) -> Result<Spawned, String> {
    let global = js_sys::global();
    let get = |k: &str| js_sys::Reflect::get(&global, &k.into()).ok().filter(|v| !v.is_undefined());
    let (Some(module), Some(url)) = (get("ternModule"), get("ternWorkerUrl").and_then(|u| u.as_string())) else {
        return Err("this copy of the page has no background workers (its boot script did not provide them)".into());
    };
    let classic = get("ternWorkerType").and_then(|t| t.as_string()).as_deref() == Some("classic");
    let options = WorkerOptions::new();
    options.set_type(if classic { WorkerType::Classic } else { WorkerType::Module });
    let worker = Worker::new_with_options(&url, &options).map_err(|e| format!("a background worker could not start ({e:?})"))?;
    let mut on_message = on_message;
    let on_message = Closure::<dyn FnMut(MessageEvent)>::new(move |e: MessageEvent| on_message(e.data()));
    worker.set_onmessage(Some(on_message.as_ref().unchecked_ref()));
    // A worker that cannot load sends a plain Event, one that throws an
    // ErrorEvent with a message.
    let mut on_error = on_error;
    let on_error = Closure::<dyn FnMut(web_sys::Event)>::new(move |e: web_sys::Event| {
        e.prevent_default();
        on_error(js_sys::Reflect::get(&e, &"message".into()).ok().and_then(|m| m.as_string()).unwrap_or_else(|| "it could not start".into()));
    });
    worker.set_onerror(Some(on_error.as_ref().unchecked_ref()));
    let init = js_sys::Object::new();
    js_sys::Reflect::set(&init, &"module".into(), &module).map_err(|_| "the module could not be handed over".to_string())?;
    worker.post_message(&init).map_err(|_| "the module could not be handed over".to_string())?;
    Ok(Spawned { worker, _on_message: on_message, _on_error: on_error })
}

/// A field of a worker's message, if present.
pub fn field(data: &JsValue, key: &str) -> Option<JsValue> {
    js_sys::Reflect::get(data, &key.into()).ok().filter(|v| !v.is_undefined())
}
