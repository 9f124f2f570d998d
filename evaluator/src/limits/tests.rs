use super::*;

/// Spins at checkpoints until stopped (or 5 s pass, a failure).
fn spin() -> Result<(), Stop> {
    catch(|| {
        let start = Instant::now();
        while start.elapsed() < Duration::from_secs(5) {
            checkpoint();
        }
    })
}

#[test]
fn a_checkpoint_stops_at_the_deadline() {
    set(Limits { time_budget: 0.05, ..Limits::default() });
    let start = Instant::now();
    let r = {
        let _s = start_statement(&CancelToken::new());
        spin()
    };
    // The watchdog raises the flag at the deadline; generous bound (common practice, no source).
    assert_eq!(r, Err(Stop::OutOfTime));
    assert!(start.elapsed() < Duration::from_secs(2), "{:?}", start.elapsed());
    // After the statement no token is installed: checkpoints never stop.
    assert!(catch(checkpoint).is_ok());
    assert!(!expired());
}

#[test]
fn another_thread_cancels() {
    set(Limits { time_budget: 60.0, ..Limits::default() });
    let cancel = CancelToken::new();
    let other = cancel.clone();
    let t = std::thread::spawn(move || {
        std::thread::sleep(Duration::from_millis(30));
        other.cancel();
    });
    let r = {
        let _s = start_statement(&cancel);
        spin()
    };
    t.join().unwrap();
    assert_eq!(r, Err(Stop::Cancelled));
}

#[test]
fn workers_entering_the_scope_stop_and_the_stop_reaches_the_caller() {
    use rayon::prelude::*;
    set(Limits { time_budget: 0.05, ..Limits::default() });
    let r = {
        let _s = start_statement(&CancelToken::new());
        let scope = scope();
        catch(|| {
            (0..64).into_par_iter().for_each_init(
                || scope.enter(),
                |_, _| {
                    let start = Instant::now();
                    while start.elapsed() < Duration::from_secs(5) {
                        checkpoint();
                    }
                },
            )
        })
    };
    assert_eq!(r, Err(Stop::OutOfTime));
}

#[test]
fn other_panics_pass_through() {
    let r = std::panic::catch_unwind(|| catch(|| std::panic::resume_unwind(Box::new("not a stop"))));
    assert!(r.is_err_and(|p| p.downcast_ref::<&str>() == Some(&"not a stop")));
}
