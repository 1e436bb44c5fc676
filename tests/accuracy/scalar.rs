//! Sweeps of the numeric core's elementary functions.

use crate::harness::{Budget, span};

case! {
    pub struct Sqrt;
    name: "Scalar::sqrt",
    unit: "1",
    domain: "0–100",
    budget: Budget { f64: 0.0, f32: 1e-6, i32f32: 2.4e-10, i8f24: 6e-8 },
    inputs: {
    span(0.0, 100.0, 2001).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(x[0].sqrt())
    },
    eval(x): {
    x[0].sqrt()
    }
}

case! {
    pub struct SinCos;
    name: "Scalar::sin",
    unit: "1",
    domain: "−2π–2π",
    budget: Budget { f64: 2.3e-16, f32: 1.2e-7, i32f32: 4e-10, i8f24: 8e-8 },
    inputs: {
    span(-6.3, 6.3, 2001).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(x[0].sin())
    },
    eval(x): {
    x[0].sin()
    }
}

case! {
    pub struct Asin;
    name: "Scalar::asin",
    unit: "rad",
    domain: "−0.999–0.999",
    budget: Budget { f64: 2.3e-16, f32: 1.2e-7, i32f32: 4e-10, i8f24: 8e-8 },
    inputs: {
    span(-0.999, 0.999, 2001).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(x[0].asin())
    },
    eval(x): {
    x[0].asin()
    }
}

case! {
    pub struct Atan2;
    name: "Scalar::atan2",
    unit: "rad",
    domain: "y, x −10–10, not both 0",
    budget: Budget { f64: 4.5e-16, f32: 2.4e-7, i32f32: 4e-10, i8f24: 8e-8 },
    inputs: {
    let mut v = Vec::new();
    for y in span(-10.0, 10.0, 41) {
        for x in span(-10.0, 10.0, 41) {
            v.push(vec![y, x]);
        }
    }
    v
    },
    reference(x): {
    (x[0] != 0.0 || x[1] != 0.0).then(|| x[0].atan2(x[1]))
    },
    eval(x): {
    x[0].atan2(x[1])
    }
}

case! {
    pub struct Ln;
    name: "Scalar::ln",
    unit: "1",
    domain: "0.01–100",
    budget: Budget { f64: 1e-15, f32: 5e-7, i32f32: 4e-10, i8f24: 8e-8 },
    inputs: {
    span(-2.0, 2.0, 2001).map(|e| vec![10f64.powf(e)]).collect()
    },
    reference(x): {
    Some(x[0].ln())
    },
    eval(x): {
    x[0].ln()
    }
}

case! {
    pub struct Exp;
    name: "Scalar::exp",
    unit: "relative",
    domain: "−4–4.5 (I8F24 range)",
    budget: Budget { f64: 4.5e-16, f32: 1.2e-7, i32f32: 1e-8, i8f24: 4e-6 },
    inputs: {
    span(-4.0, 4.5, 2001).map(|x| vec![x]).collect()
    },
    reference(_x): {
    Some(1.0)
    },
    eval(x): {
    // exp(x) / reference: relative error, so that large results count fairly.
    let r = libm::exp(x[0].to_f64());
    S::from_f64(x[0].exp()?.to_f64() / r)
    }
}
