//! Water content of honey against nD at 20 °C: the refractometric moisture
//! table of the Harmonised Methods of the International Honey Commission
//! (Wedmore's revision of the Chataway table), the rows read from a public
//! reproduction of that table: 13.0–16.4 % and 19.0–22.4 % water in 0.2 %
//! steps. The rows between (16.6–18.8 %) and above 22.4 % were not legible in
//! the copy read. Shared by the tests that check the honey scale.

/// (water g/100 g, nD at 20 °C).
pub const ROWS: [(f64, f64); 36] = [
    (13.0, 1.5044),
    (13.2, 1.5038),
    (13.4, 1.5033),
    (13.6, 1.5028),
    (13.8, 1.5023),
    (14.0, 1.5018),
    (14.2, 1.5012),
    (14.4, 1.5007),
    (14.6, 1.5002),
    (14.8, 1.4997),
    (15.0, 1.4992),
    (15.2, 1.4987),
    (15.4, 1.4982),
    (15.6, 1.4976),
    (15.8, 1.4971),
    (16.0, 1.4966),
    (16.2, 1.4961),
    (16.4, 1.4956),
    (19.0, 1.4890),
    (19.2, 1.4885),
    (19.4, 1.4880),
    (19.6, 1.4875),
    (19.8, 1.4870),
    (20.0, 1.4865),
    (20.2, 1.4860),
    (20.4, 1.4855),
    (20.6, 1.4850),
    (20.8, 1.4845),
    (21.0, 1.4840),
    (21.2, 1.4835),
    (21.4, 1.4830),
    (21.6, 1.4825),
    (21.8, 1.4820),
    (22.0, 1.4815),
    (22.2, 1.4810),
    (22.4, 1.4805),
];
