//! The canvas backend of plotters, with two costs of the live page removed:
//! text is measured with the canvas's own `measureText` (plotters' default on
//! the web inserts a DOM element and forces a page layout for every label)
//! and remembered across redraws; and a polyline is cut to the points that
//! change its picture (per pixel column: first, lowest, highest, last), since
//! 2000 points across a few hundred pixels would otherwise mean thousands of
//! calls into the browser per trace, and the cut polyline goes to the page's
//! painter as one Float64Array (one call per trace; `use_polyline_painter`).
//! Everything else is drawn by plotters-canvas.
use plotters_backend::{BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind};
use plotters_canvas::CanvasBackend;
use std::cell::RefCell;
use std::collections::HashMap;
use std::rc::Rc;
use wasm_bindgen::prelude::wasm_bindgen;
use wasm_bindgen::{JsCast, JsValue};
use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

thread_local! {
    /// The page's polyline painter, `(context, Float64Array [x0, y0, x1, y1 ...])`,
    /// which strokes the path as plotters-canvas would (begin, move, lines,
    /// stroke) with the style already set. None: plotters-canvas draws.
    static POLYLINE: RefCell<Option<js_sys::Function>> = const { RefCell::new(None) };
}

/// Hands the core the page's polyline painter (see `POLYLINE`).
#[wasm_bindgen]
pub fn use_polyline_painter(painter: js_sys::Function) {
    POLYLINE.with(|p| *p.borrow_mut() = Some(painter));
}

/// Measured text boxes by (CSS font, text); shared by the four canvases.
pub type TextSizes = Rc<RefCell<HashMap<(String, String), (u32, u32)>>>;

/// Entries kept before the memory starts over (labels of a session are few).
const MAX_REMEMBERED: usize = 4096;

/// Collects the text a drawing puts on its canvas.
#[derive(Clone, Default)]
pub struct DrawnText(Rc<RefCell<Vec<String>>>);

impl DrawnText {
    pub fn take(&self) -> Vec<String> {
        std::mem::take(&mut *self.0.borrow_mut())
    }
}

pub struct FastCanvas {
    inner: CanvasBackend,
    context: CanvasRenderingContext2d,
    sizes: TextSizes,
    texts: Option<DrawnText>,
}

type Failure = DrawingErrorKind<<CanvasBackend as DrawingBackend>::ErrorType>;

impl FastCanvas {
    pub fn new(canvas: HtmlCanvasElement, sizes: TextSizes, texts: Option<DrawnText>) -> Option<FastCanvas> {
        let context = canvas.get_context("2d").ok()??.dyn_into::<CanvasRenderingContext2d>().ok()?;
        let inner = CanvasBackend::with_canvas_object(canvas)?;
        Some(FastCanvas { inner, context, sizes, texts })
    }
}

/// Keeps, for each run of points in one pixel column, the first, the
/// extremes and the last point: the same pixels, far fewer segments.
pub fn thin_path(points: impl IntoIterator<Item = BackendCoord>) -> Vec<BackendCoord> {
    let mut out: Vec<BackendCoord> = Vec::new();
    let mut run: Vec<BackendCoord> = Vec::new();
    let flush = |run: &mut Vec<BackendCoord>, out: &mut Vec<BackendCoord>| {
        let (Some(&first), Some(&last)) = (run.first(), run.last()) else { return };
        let lo = run.iter().enumerate().min_by_key(|(_, p)| p.1).map(|(i, _)| i).unwrap_or(0);
        let hi = run.iter().enumerate().max_by_key(|(_, p)| p.1).map(|(i, _)| i).unwrap_or(0);
        let (a, b) = if lo <= hi { (lo, hi) } else { (hi, lo) };
        for p in [first, run[a], run[b], last] {
            if out.last() != Some(&p) {
                out.push(p);
            }
        }
        run.clear();
    };
    for p in points {
        if run.first().is_some_and(|f| f.0 != p.0) {
            flush(&mut run, &mut out);
        }
        run.push(p);
    }
    flush(&mut run, &mut out);
    out
}

impl DrawingBackend for FastCanvas {
    type ErrorType = <CanvasBackend as DrawingBackend>::ErrorType;

    fn get_size(&self) -> (u32, u32) {
        self.inner.get_size()
    }
    fn ensure_prepared(&mut self) -> Result<(), Failure> {
        self.inner.ensure_prepared()
    }
    fn present(&mut self) -> Result<(), Failure> {
        self.inner.present()
    }
    fn draw_pixel(&mut self, point: BackendCoord, color: BackendColor) -> Result<(), Failure> {
        self.inner.draw_pixel(point, color)
    }
    fn draw_line<S: BackendStyle>(&mut self, from: BackendCoord, to: BackendCoord, style: &S) -> Result<(), Failure> {
        self.inner.draw_line(from, to, style)
    }
    fn draw_rect<S: BackendStyle>(
        &mut self,
        upper_left: BackendCoord,
        bottom_right: BackendCoord,
        style: &S,
        fill: bool,
    ) -> Result<(), Failure> {
        self.inner.draw_rect(upper_left, bottom_right, style, fill)
    }
    fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, path: I, style: &S) -> Result<(), Failure> {
        let points = thin_path(path);
        let Some(painter) = POLYLINE.with(|p| p.borrow().clone()) else { return self.inner.draw_path(points, style) };
        let colour = style.color();
        if colour.alpha == 0.0 || points.is_empty() {
            return Ok(());
        }
        // The stroke style exactly as plotters-canvas sets it, so the pixels are its own.
        let (r, g, b) = colour.rgb;
        self.context.set_stroke_style_str(&format!("rgba({},{},{},{})", r, g, b, colour.alpha));
        self.context.set_line_width(style.stroke_width() as f64);
        let xy: Vec<f64> = points.iter().flat_map(|p| [f64::from(p.0), f64::from(p.1)]).collect();
        match painter.call2(&JsValue::NULL, &JsValue::from(&self.context), &js_sys::Float64Array::from(&xy[..])) {
            Ok(_) => Ok(()),
            // A painter that throws: plotters-canvas draws this path instead.
            Err(_) => self.inner.draw_path(points, style),
        }
    }
    fn draw_circle<S: BackendStyle>(&mut self, center: BackendCoord, radius: u32, style: &S, fill: bool) -> Result<(), Failure> {
        self.inner.draw_circle(center, radius, style, fill)
    }
    fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, vert: I, style: &S) -> Result<(), Failure> {
        self.inner.fill_polygon(vert, style)
    }
    fn draw_text<T: BackendTextStyle>(&mut self, text: &str, style: &T, pos: BackendCoord) -> Result<(), Failure> {
        if let Some(texts) = &self.texts {
            texts.0.borrow_mut().push(text.to_string());
        }
        self.inner.draw_text(text, style, pos)
    }
    fn estimate_text_size<T: BackendTextStyle>(&self, text: &str, style: &T) -> Result<(u32, u32), Failure> {
        // The same CSS font string plotters-canvas draws with.
        let font = format!("{} {}px {}", style.style().as_str(), style.size(), style.family().as_str());
        let key = (font, text.to_string());
        if let Some(size) = self.sizes.borrow().get(&key) {
            return Ok(*size);
        }
        self.context.set_font(&key.0);
        let size = match self.context.measure_text(text) {
            Ok(m) => {
                let height = m.font_bounding_box_ascent() + m.font_bounding_box_descent();
                (m.width().round().max(0.0) as u32, height.round().max(0.0) as u32)
            }
            // Should the canvas refuse, fall back to plotters' own measure.
            Err(_) => {
                let ((x0, y0), (x1, y1)) = style.layout_box(text).map_err(|e| DrawingErrorKind::FontError(Box::new(e)))?;
                ((x1 - x0).max(0) as u32, (y1 - y0).max(0) as u32)
            }
        };
        let mut sizes = self.sizes.borrow_mut();
        if sizes.len() >= MAX_REMEMBERED {
            sizes.clear();
        }
        sizes.insert(key, size);
        Ok(size)
    }
}
